// Creates an account, its own team (the new user is its lead) and a session.
import { signUpSchema } from '#shared/types/account'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(signUpSchema))
  await takeVolume(useDb(), event, 'sign-up', clientAddress(event), volumeLimits.signUpsPerAddress(),
    (minutes) => `Too many new accounts from your network in the last hour. Try again in ${minutes} minute(s), or ask a team lead to invite you.`)
  const { userId, teamId } = await signUpAccount(useDb(), body)
  await startSession(event, userId)
  setResponseStatus(event, 201)
  return { user: { id: userId, email: body.email, name: body.name }, teamId }
})
