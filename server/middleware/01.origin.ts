// Refuses state-changing requests whose Origin is missing or not this host (cross-site request forgery).
// Requests authenticated by an API token are exempt (server/utils/api-tokens.ts says why).
import { isOriginAllowed } from '../utils/origin'

export default defineApiHandler((event) => {
  // A bearer-token request carries no ambient credential a forger could borrow (see server/utils/api-tokens.ts).
  if (bearerToken(event) !== null) return
  const origin = getRequestHeader(event, 'origin')
  const host = getRequestHeader(event, 'host')
  // The scheme the browser used: https behind a TLS-terminating proxy that says so in X-Forwarded-Proto (a page
  // cannot set that header on a cross-site request), else the socket's own.
  const scheme = getRequestProtocol(event) === 'https' ? 'https' : 'http'
  if (!isOriginAllowed(event.method, origin, host, scheme)) {
    throw createError({
      statusCode: 403,
      statusMessage: 'Forbidden',
      message: origin
        ? `Request refused: origin ${origin} is not this site.`
        : 'Request refused: a change must come from a Lensfield page (missing Origin header).',
    })
  }
})
