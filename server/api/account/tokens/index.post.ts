// Creates a personal API token; the secret is in this reply only.
import { apiTokenCreateSchema } from '#shared/types/team'

export default defineApiHandler(async (event) => {
  const user = requireUser(event)
  requireSessionAuth(event)
  const { name } = await readValidatedBody(event, zodValidator(apiTokenCreateSchema))
  setResponseStatus(event, 201)
  return await createApiToken(useDb(), user.id, name)
})
