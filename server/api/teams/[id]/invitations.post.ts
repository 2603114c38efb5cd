// A lead invites an e-mail address into the team with a role; the link goes out by mail only.
import { idParamSchema } from '#shared/types/project'
import { invitationCreateSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  const body = await readValidatedBody(event, zodValidator(invitationCreateSchema))
  const { user } = await requireTeamRole(event, id, ['lead'], 'inviting people')
  const db = useDb()
  await assertNoPendingInvitation(db, id, body.email)
  await takeVolume(db, event, 'invitation-team', id, volumeLimits.invitationsPerTeam(),
    (minutes) => `This team has sent its ${volumeLimits.invitationsPerTeam()} invitations for this hour. Try again in ${minutes} minute(s).`)
  await takeVolume(db, event, 'invitation-address', clientAddress(event), volumeLimits.invitationsPerAddress(),
    (minutes) => `Too many invitations from your network in the last hour. Try again in ${minutes} minute(s).`)
  const invitation = await createInvitation(db, {
    teamId: id, email: body.email, role: body.role, invitedBy: { id: user.id, name: user.name }, baseUrl: getRequestURL(event).origin,
  })
  setResponseStatus(event, 201)
  return { invitation }
})
