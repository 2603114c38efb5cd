// Upload of a measurement table as the raw CSV body: POST /api/projects/:id/tables?kind=…&name=…&fileName=…
// [&fit=isotonic&smoothPoints=5 | &fit=asphere&asphereTerms=0] for a stylus trace to be fitted (raw rows kept).
import { idParamSchema } from '#shared/types/project'
import { dataTableUploadQuerySchema } from '#shared/types/data-table'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const query = await getValidatedQuery(event, zodValidator(dataTableUploadQuerySchema))
  const { user } = await requireProjectRole(event, id, EDITOR_ROLES, 'uploading tables')
  const bytes = await readUploadBody(event)
  const table = await storeDataTable(useDb(), { projectId: id, kind: query.kind, name: query.name, fileName: query.fileName, userId: user.id, bytes,
    fit: query.fit === 'none' ? null : { method: query.fit, smoothPoints: query.smoothPoints, asphereTerms: query.asphereTerms } })
  setResponseStatus(event, 201)
  return { table }
})
