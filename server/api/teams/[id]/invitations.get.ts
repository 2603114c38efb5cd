import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireTeamRole(event, id, ['lead'], 'seeing invitations')
  return { invitations: await listInvitations(useDb(), id) }
})
