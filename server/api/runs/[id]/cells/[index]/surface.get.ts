// The cell's lens surface for mastering: ?format=stl (binary STL patch of lensesX × lensesY lenses at
// samplesPerPitch grid steps per pitch, µm) or sag (radial sag table CSV of one cap, `points` rows).
import { eq, and } from 'drizzle-orm'
import { runCells } from '~~/server/db/schema'
import { cellParamSchema } from '#shared/types/run'
import { surfaceExportQuerySchema } from '#shared/types/export'

export default defineApiHandler(async (event) => {
  const { id, index } = await getValidatedRouterParams(event, zodValidator(cellParamSchema))
  const q = await getValidatedQuery(event, zodValidator(surfaceExportQuerySchema))
  const { run } = await requireRunRole(event, id, ANY_ROLE)
  const [cell] = await useDb().select({ scenario: runCells.scenario }).from(runCells).where(and(eq(runCells.runId, run.id), eq(runCells.cellIndex, index)))
  if (!cell) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `This run has no cell ${index}; it has ${run.cellsTotal}.` })
  const lens = (cell.scenario as { lensArray?: LensSpec | null } | null)?.lensArray
  if (!lens) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This cell has no lens array (flat device or infeasible cell): there is no surface to export.' })
  const name = downloadName(run.name, `cell${index}`)
  if (q.format === 'sag') {
    setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
    setResponseHeader(event, 'content-disposition', `attachment; filename="${name}-sag.csv"`)
    return sagTableCsv(lens, q.points, `${run.name} cell ${index}`.replace(/[\r\n]+/g, ' '))
  }
  const g = patchGrid(lens, q.lensesX, q.lensesY, q.samplesPerPitch)
  if (g.triangles > MAX_STL_TRIANGLES) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: `That patch would have ${g.triangles} triangles; at most ${MAX_STL_TRIANGLES}. Use fewer lenses or fewer samplesPerPitch.` })
  }
  setResponseHeader(event, 'content-type', 'model/stl')
  setResponseHeader(event, 'content-disposition', `attachment; filename="${name}-${q.lensesX}x${q.lensesY}.stl"`)
  return surfaceStl(lens, q.lensesX, q.lensesY, q.samplesPerPitch)
})
