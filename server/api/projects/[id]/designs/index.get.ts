import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireProjectRole(event, id, ANY_ROLE)
  return { designs: await listDesigns(useDb(), id) }
})
