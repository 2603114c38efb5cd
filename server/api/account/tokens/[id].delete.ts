import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const user = requireUser(event)
  requireSessionAuth(event)
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await revokeApiToken(useDb(), user.id, id)
  return { ok: true }
})
