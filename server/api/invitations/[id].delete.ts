// A lead withdraws an unused invitation.
import { idParamSchema } from '#shared/types/project'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  requireUser(event)
  const teamId = await findInvitationTeam(useDb(), id)
  if (!teamId) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'Invitation not found among your teams.' })
  const { user } = await requireTeamRole(event, teamId, ['lead'], 'withdrawing invitations')
  await revokeInvitation(useDb(), teamId, id, user.id)
  return { ok: true }
})
