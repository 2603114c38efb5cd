import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const { design, role } = await requireDesignRole(event, id, ANY_ROLE)
  return { design, role }
})
