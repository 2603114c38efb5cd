// Cross-site request refusal: a state-changing request must carry an Origin whose host is the request's host.
// Pure function so it can be unit-tested; server/middleware/01.origin.ts applies it.

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE'])

export function isStateChangingMethod(method: string): boolean {
  return STATE_CHANGING.has(method.toUpperCase())
}

/**
 * True when a request with this method, Origin header and Host header may proceed.
 * Safe methods always pass; state-changing ones need an Origin (http/https) whose host[:port] equals Host and, when
 * the request's scheme is given, whose scheme is that one too (an https page is another origin than the http site).
 */
export function isOriginAllowed(
  method: string, origin: string | undefined | null, host: string | undefined | null, scheme?: 'http' | 'https',
): boolean {
  if (!isStateChangingMethod(method)) return true
  if (!origin || !host) return false
  let url: URL
  try {
    url = new URL(origin)
  } catch {
    return false
  }
  if (url.protocol !== 'http:' && url.protocol !== 'https:') return false
  if (scheme && url.protocol !== `${scheme}:`) return false
  return url.host.toLowerCase() === host.trim().toLowerCase()
}
