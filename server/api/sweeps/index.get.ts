import { runListQuerySchema } from '#shared/types/run'

export default defineApiHandler(async (event) => {
  const q = await getValidatedQuery(event, zodValidator(runListQuerySchema.omit({ kind: true })))
  await requireProjectRole(event, q.projectId, ANY_ROLE)
  return { sweeps: await listRuns(q.projectId, 'sweep') }
})
