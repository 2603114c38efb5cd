// One uploaded table with its rows (raw, and fitted for a fitted trace), the file as uploaded, and the scenario
// fragment it becomes.
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  requireUser(event)
  const table = await getDataTable(useDb(), id)
  if (!table) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Table not found among your teams\' projects.' })
  await requireProjectRole(event, table.projectId, ANY_ROLE)
  return { table: { ...describeTable(table), rows: table.rows, fittedRows: table.fittedRows, sourceText: table.sourceText } }
})
