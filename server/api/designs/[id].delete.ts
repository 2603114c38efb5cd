import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireDesignRole(event, id, EDITOR_ROLES, 'deleting a design')
  await deleteDesign(useDb(), id)
  setResponseStatus(event, 204)
  return null
})
