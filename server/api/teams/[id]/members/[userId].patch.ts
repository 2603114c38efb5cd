// A lead changes a member's role; the last lead cannot be demoted (409).
import { memberParamSchema, memberRoleSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { id, userId } = await getValidatedRouterParams(event, zodValidator(memberParamSchema))
  const { role } = await readValidatedBody(event, zodValidator(memberRoleSchema))
  await requireTeamRole(event, id, ['lead'], 'changing roles')
  return { member: await changeMemberRole(useDb(), id, userId, role) }
})
