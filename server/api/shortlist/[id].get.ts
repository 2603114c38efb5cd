// One shortlist entry with its comments.
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { entry, project, role } = await requireShortlistRole(event, id, ANY_ROLE)
  const full = (await listShortlist(useDb(), project.id)).find((e) => e.id === entry.id)
  return { role, project: { id: project.id, name: project.name }, entry: full, comments: await listComments(useDb(), entry.id) }
})
