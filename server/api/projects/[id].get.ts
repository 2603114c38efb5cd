import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { project, role } = await requireProjectRole(event, id, ANY_ROLE)
  return { project, role }
})
