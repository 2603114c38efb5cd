// Sign-in: throttled per account and per address (server/utils/sign-in-limit.ts), one message for every failure
// (no hint whether the e-mail has an account; unknown e-mails cost the same argon2 time), and a new session id on
// every sign-in: a session the browser already carried is ended first, so a planted cookie never becomes a login.
import { signInSchema } from '#shared/types/account'
import { assertSignInAllowed, clearSignInFailures, recordSignInFailure } from '~~/server/utils/sign-in-limit'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(signInSchema))
  const db = useDb()
  await assertSignInAllowed(db, event, body.email)
  const userId = await authenticate(db, body)
  if (!userId) {
    await recordSignInFailure(db, event, body.email)
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'E-mail or password is not right. Check both and try again.' })
  }
  await clearSignInFailures(db, body.email)
  await endSession(event)
  await startSession(event, userId)
  return { ok: true }
})
