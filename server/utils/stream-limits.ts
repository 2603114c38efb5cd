// Caps on open progress streams (SSE). Each stream costs a socket and a share of every state read, so one session
// or API token may hold LENSFIELD_STREAMS_PER_SESSION (20) streams and one client address
// LENSFIELD_STREAMS_PER_ADDRESS (60); beyond that the request gets 429 with a sentence and Retry-After.
import { createError, setResponseHeader, type H3Event } from 'h3'
import { clientAddress } from './sign-in-limit'

const open = { bySession: new Map<string, number>(), byAddress: new Map<string, number>() }

function limit(name: string, fallback: number): number {
  const n = Number(process.env[name])
  return Number.isInteger(n) && n > 0 ? n : fallback
}

const bump = (m: Map<string, number>, key: string, by: number) => {
  const n = (m.get(key) ?? 0) + by
  if (n > 0) m.set(key, n)
  else m.delete(key)
}

/** Takes a stream slot for this request's session (or token) and address, or throws 429; returns its release. */
export function takeStreamSlot(event: H3Event): () => void {
  const ctx = event.context as { session?: { id: string } | null, apiTokenId?: string, user?: { id: string } | null }
  const session = ctx.apiTokenId ? `token:${ctx.apiTokenId}` : ctx.session ? `session:${ctx.session.id}` : `user:${ctx.user?.id ?? '-'}`
  const address = clientAddress(event)
  const perSession = limit('LENSFIELD_STREAMS_PER_SESSION', 20)
  const perAddress = limit('LENSFIELD_STREAMS_PER_ADDRESS', 60)
  const tooMany = (what: string, n: number) => {
    setResponseHeader(event, 'retry-after', 10)
    return createError({
      statusCode: 429, statusMessage: 'Too Many Requests',
      message: `Too many live progress views open ${what} (at most ${n}); close some tabs and reload.`,
    })
  }
  if ((open.bySession.get(session) ?? 0) >= perSession) throw tooMany('in this session', perSession)
  if ((open.byAddress.get(address) ?? 0) >= perAddress) throw tooMany('from your address', perAddress)
  bump(open.bySession, session, 1)
  bump(open.byAddress, address, 1)
  let released = false
  return () => {
    if (released) return
    released = true
    bump(open.bySession, session, -1)
    bump(open.byAddress, address, -1)
  }
}
