// Saves a change to a design as its next version.
import { designUpdateSchema } from '#shared/types/design'
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { user, design, project } = await requireDesignRole(event, id, EDITOR_ROLES, 'changing a design')
  const body = await readValidatedBody(event, zodValidator(designUpdateSchema))
  // referenced tables must exist in the team, be of the field's kind and cover the spectrum (the design keeps the reference)
  if (body.scenario !== undefined) await resolveScenarioTables(useDb(), project.teamId, body.scenario)
  return { design: await updateDesign(useDb(), design, user.id, body) }
})
