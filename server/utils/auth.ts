// Sessions with lucia 3, stored in Postgres (tables users/sessions of server/db/schema.ts).
// server/middleware/02.session.ts validates the cookie on every request and puts user/session on event.context.
import { Lucia, type Session, type User } from 'lucia'
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql'
import { appendHeader, createError, getCookie, type H3Event } from 'h3'
import { usePool } from './db'

function createLucia() {
  const adapter = new NodePostgresAdapter(usePool(), { user: 'users', session: 'sessions' })
  return new Lucia(adapter, {
    sessionCookie: {
      name: 'lensfield_session',
      // HttpOnly is lucia's default; SameSite=Lax keeps the cookie off cross-site subrequests.
      attributes: { secure: process.env.NODE_ENV !== 'development', sameSite: 'lax' },
    },
    // The adapter hands over every users column but id (snake_case); expose only what the app may show.
    getUserAttributes: (row) => ({ email: row.email, name: row.name }),
  })
}

declare module 'lucia' {
  interface Register {
    Lucia: ReturnType<typeof createLucia>
    DatabaseUserAttributes: { email: string, name: string }
  }
}

declare module 'h3' {
  interface H3EventContext {
    user: User | null
    session: Session | null
  }
}

let lucia: ReturnType<typeof createLucia> | undefined
export function useLucia() {
  lucia ??= createLucia()
  return lucia
}

/** Reads and validates the session cookie; refreshes or clears it as lucia advises. */
export async function loadSession(event: H3Event): Promise<{ user: User | null, session: Session | null }> {
  const auth = useLucia()
  const sessionId = getCookie(event, auth.sessionCookieName) ?? null
  if (!sessionId) return { user: null, session: null }
  const { session, user } = await auth.validateSession(sessionId)
  if (session && session.fresh) appendHeader(event, 'Set-Cookie', auth.createSessionCookie(session.id).serialize())
  if (!session) appendHeader(event, 'Set-Cookie', auth.createBlankSessionCookie().serialize())
  return { user, session }
}

/** Starts a session for userId and sets its cookie on the response. */
export async function startSession(event: H3Event, userId: string) {
  const auth = useLucia()
  const session = await auth.createSession(userId, {})
  appendHeader(event, 'Set-Cookie', auth.createSessionCookie(session.id).serialize())
  return session
}

/** Ends the current session (if any) and clears the cookie. */
export async function endSession(event: H3Event) {
  const auth = useLucia()
  if (event.context.session) await auth.invalidateSession(event.context.session.id)
  appendHeader(event, 'Set-Cookie', auth.createBlankSessionCookie().serialize())
}

/** The signed-in user, or 401. */
export function requireUser(event: H3Event): User {
  const user = event.context.user
  if (!user) throw createError({ statusCode: 401, statusMessage: 'Unauthorized', message: 'Sign in to continue.' })
  return user
}
