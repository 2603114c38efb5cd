// A lead removes a member from the team; the last lead cannot be removed (409).
import { memberParamSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { id, userId } = await getValidatedRouterParams(event, zodValidator(memberParamSchema))
  await requireTeamRole(event, id, ['lead'], 'removing members')
  return { removed: await removeMember(useDb(), id, userId) }
})
