// A lead invites an e-mail address into the team with a role; the link goes out by mail only.
import { idParamSchema } from '../../../../shared/types/project'
import { invitationCreateSchema } from '../../../../shared/types/team'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const body = await readValidatedBody(event, zodValidator(invitationCreateSchema))
  const { user } = await requireTeamRole(event, id, ['lead'], 'inviting people')
  const invitation = await createInvitation(useDb(), {
    teamId: id, email: body.email, role: body.role, invitedBy: { id: user.id, name: user.name }, baseUrl: getRequestURL(event).origin,
  })
  setResponseStatus(event, 201)
  return { invitation }
})
