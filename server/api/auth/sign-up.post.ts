// Creates an account, its own team (the new user is its lead) and a session.
import { signUpSchema } from '../../../shared/types/account'

export default defineApiHandler(async (event) => {
  const body = await readValidatedBody(event, zodValidator(signUpSchema))
  const { userId, teamId } = await signUpAccount(useDb(), body)
  await startSession(event, userId)
  setResponseStatus(event, 201)
  return { user: { id: userId, email: body.email, name: body.name }, teamId }
})
