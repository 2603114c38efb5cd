// Sets a new password from a reset link; every existing session of the account is ended, a new one started.
import { passwordResetConfirmSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const { token, password } = await readValidatedBody(event, zodValidator(passwordResetConfirmSchema))
  const userId = await resetPassword(useDb(), token, password)
  await useLucia().invalidateUserSessions(userId)
  await startSession(event, userId)
  return { ok: true }
})
