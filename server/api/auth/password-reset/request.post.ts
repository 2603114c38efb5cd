// Always 202 with the same message; the mail (if the address has an account) goes out after the reply.
import { passwordResetRequestSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { email } = await readValidatedBody(event, zodValidator(passwordResetRequestSchema))
  const origin = getRequestURL(event).origin
  const work = sendPasswordReset(useDb(), email, origin).catch((err) => console.error('[mail] password reset:', (err as Error).message))
  event.waitUntil?.(work)
  setResponseStatus(event, 202)
  return { message: `If ${email} has a Lensfield account, a reset link is on its way. It works once, for an hour.` }
})
