import { designCreateSchema } from '#shared/types/design'
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  // Role first: a viewer learns they cannot save before being told what is wrong with the body.
  const { user } = await requireProjectRole(event, id, EDITOR_ROLES, 'saving a design')
  const body = await readValidatedBody(event, zodValidator(designCreateSchema))
  const design = await createDesign(useDb(), id, user.id, body)
  setResponseStatus(event, 201)
  return { design }
})
