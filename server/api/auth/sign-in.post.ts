import { signInSchema } from '../../../shared/types/account'

export default defineEventHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(signInSchema))
  const userId = await authenticate(useDb(), body)
  if (!userId) {
    throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'E-mail or password is not right. Check both and try again.' })
  }
  await startSession(event, userId)
  return { ok: true }
})
