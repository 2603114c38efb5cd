// One cell's full result: every figure with its σ, the 1° profile and the θ–φ map, expanded from the stored counts.
import { cellParamSchema } from '#shared/types/run'

export default defineApiHandler(async (event) => {
  const { id, index } = await getValidatedRouterParams(event, zodValidator(cellParamSchema))
  const { run } = await requireRunRole(event, id, ANY_ROLE)
  const cell = await cellResult(run.id, index)
  if (!cell) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `This run has no cell ${index}; it has ${run.cellsTotal}.` })
  return cell
})
