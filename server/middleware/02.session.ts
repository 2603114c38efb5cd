// Puts the signed-in user and session (or null) on event.context for every API request. A request with
// `Authorization: Bearer <token>` is authenticated by the token alone (server/utils/api-tokens.ts); its cookie is ignored.
import { loadSession } from '../utils/auth'

export default defineApiHandler(async (event) => {
  if (!event.path.startsWith('/api/')) return
  const token = bearerToken(event)
  if (token !== null) {
    const found = await userForApiToken(useDb(), token)
    if (!found) throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'This API token is unknown or revoked. Create a new one on your account page.' })
    event.context.user = found.user
    event.context.session = null
    event.context.authMethod = 'token'
    event.context.apiTokenId = found.tokenId
    return
  }
  const { user, session } = await loadSession(event)
  event.context.user = user
  event.context.session = session
  event.context.authMethod = session ? 'session' : undefined
})
