import { projectCreateSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(projectCreateSchema))
  await requireTeamRole(event, body.teamId, EDITOR_ROLES, 'creating a project')
  const project = await createProject(useDb(), body)
  setResponseStatus(event, 201)
  return { project }
})
