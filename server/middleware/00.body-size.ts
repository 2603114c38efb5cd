// Request bodies are refused before they are read when they are too large: the declared Content-Length is checked
// against the route's limit (uploads of measured tables 2 MB, everything else 256 KiB — a scenario with a
// 5 000-row measured profile is under 200 KiB). A body without a declared length is refused (411): browsers and
// curl always declare one, and reading an open-ended stream to find out would be the very thing to avoid.
import { createError, getRequestHeader } from 'h3'

export const JSON_BODY_LIMIT_BYTES = 256 * 1024
const UPLOAD_ROUTE = /^\/api\/projects\/[^/]+\/tables\/?(\?|$)/
const UPLOAD_LIMIT_BYTES = 2 * 1024 * 1024

export default defineApiHandler((event) => {
  const method = event.method
  if (method !== 'POST' && method !== 'PUT' && method !== 'PATCH' && method !== 'DELETE') return
  if (!event.path.startsWith('/api/')) return
  const declared = getRequestHeader(event, 'content-length')
  const chunked = /chunked/i.test(getRequestHeader(event, 'transfer-encoding') ?? '')
  if (declared === undefined) {
    if (chunked) throw createError({ statusCode: 411, statusMessage: 'Length Required', message: 'Send the body with a Content-Length header.' })
    return
  }
  const length = Number(declared)
  const limit = UPLOAD_ROUTE.test(event.path) ? UPLOAD_LIMIT_BYTES : JSON_BODY_LIMIT_BYTES
  if (Number.isFinite(length) && length > limit) {
    throw createError({
      statusCode: 413,
      statusMessage: 'Payload Too Large',
      message: `The request body is ${length} bytes; this route accepts at most ${limit} bytes. Nothing was read or stored.`,
    })
  }
})
