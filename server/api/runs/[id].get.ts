import { idParamSchema } from '#shared/types/project'
import { runProgress } from '~~/server/runs/progress'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { run, role } = await requireRunRole(event, id, ANY_ROLE)
  const cells = await listCellSummaries(id)
  return { run, role, progress: await runProgress(id), cells }
})
