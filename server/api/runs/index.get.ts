import { runListQuerySchema } from '#shared/types/run'

export default defineApiHandler(async (event) => {
  const q = await getValidatedQuery(event, zodValidator(runListQuerySchema))
  await requireProjectRole(event, q.projectId, ANY_ROLE)
  return { runs: await listRuns(q.projectId, q.kind) }
})
