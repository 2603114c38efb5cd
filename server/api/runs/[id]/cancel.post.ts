import { idParamSchema } from '#shared/types/project'
import { cancelRun } from '~~/server/runs/cancel'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireRunRole(event, id, EDITOR_ROLES, 'cancelling a run')
  const r = await cancelRun(id)
  if (!r.cancelled) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `This run has already ended (${r.status}); nothing to cancel.` })
  }
  return r
})
