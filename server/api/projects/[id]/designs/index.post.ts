import { designCreateSchema } from '#shared/types/design'
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  // Role first: a viewer learns they cannot save before being told what is wrong with the body.
  const { user, project } = await requireProjectRole(event, id, EDITOR_ROLES, 'saving a design')
  const body = await readValidatedBody(event, zodValidator(designCreateSchema))
  // referenced tables must exist in the team, be of the field's kind and cover the spectrum (the design keeps the reference)
  await resolveScenarioTables(useDb(), project.teamId, body.scenario)
  const design = await createDesign(useDb(), id, user.id, body)
  setResponseStatus(event, 201)
  return { design }
})
