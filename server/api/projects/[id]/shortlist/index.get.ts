// The project's shortlist (chosen candidate first) and its history of changes.
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { role } = await requireProjectRole(event, id, ANY_ROLE)
  const db = useDb()
  return { role, entries: await listShortlist(db, id), history: await listShortlistHistory(db, id) }
})
