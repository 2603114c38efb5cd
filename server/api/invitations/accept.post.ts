// Uses an invitation link once: joins the signed-in account (same e-mail) or creates the account, with the role.
import { invitationAcceptSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(invitationAcceptSchema))
  const me = event.context.user
  const result = await acceptInvitation(useDb(), body, me ? { id: me.id, email: me.email } : null)
  if (!me) await startSession(event, result.userId)
  return result
})
