// One cell's result as a file: ?format=csv (long format) or json (everything, with the scenario).
import { cellParamSchema } from '#shared/types/run'
import { resultExportQuerySchema } from '#shared/types/export'

export default defineApiHandler(async (event) => {
  const { id, index } = await getValidatedRouterParams(event, zodValidator(cellParamSchema))
  const { format } = await getValidatedQuery(event, zodValidator(resultExportQuerySchema))
  const { run } = await requireRunRole(event, id, ANY_ROLE)
  const found = await cellResult(run.id, index)
  if (!found) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: `This run has no cell ${index}; it has ${run.cellsTotal}.` })
  if (!found.result) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'Nothing is traced in this cell yet; export it once its first batch is counted.' })
  const name = downloadName(run.name, `cell${index}`)
  if (format === 'json') {
    setResponseHeader(event, 'content-disposition', `attachment; filename="${name}.json"`)
    const cell = { ...found.cell, scenario: tracedScenario(found.cell.scenario, found.result.rays, Number(found.cell.seed)) }
    return { run: { id: run.id, name: run.name, designName: run.designName, designVersion: run.designVersion, engineVersion: run.engineVersion }, cell,
      result: found.result }
  }
  setResponseHeader(event, 'content-type', 'text/csv; charset=utf-8')
  setResponseHeader(event, 'content-disposition', `attachment; filename="${name}.csv"`)
  return resultCsv(run, index, found.cell.coordinates, found.result)
})
