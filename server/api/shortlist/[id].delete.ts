import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { entry, user, role } = await requireShortlistRole(event, id, ANY_ROLE)
  await removeEntry(useDb(), entry, user, role)
  return { ok: true }
})
