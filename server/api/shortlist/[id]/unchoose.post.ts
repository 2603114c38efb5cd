import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { entry, user } = await requireShortlistRole(event, id, ['lead'], 'changing the chosen candidate')
  return { entry: await unchooseEntry(useDb(), entry, user.id) }
})
