// The signed-in user and their teams, fetched once per page load (SSR forwards the cookie) and shared.
export interface SessionUser {
  user: { id: string, email: string, name: string }
  teams: { id: string, name: string, slug: string, role: 'lead' | 'designer' | 'viewer' }[]
}

export function useSessionUser() {
  return useState<SessionUser | null>('session-user', () => null)
}

/**
 * Whether this page load has asked the server who is signed in. Set during server rendering and carried to the
 * browser in the payload, so the browser does not ask again: a signed-out page (sign-in, sign-up, reset-password)
 * then sends no request that can only answer 401, and the console stays clean.
 */
export function useSessionKnown() {
  return useState<boolean>('session-known', () => false)
}

/** Loads /api/auth/me into the shared state; null when signed out. */
export async function refreshSessionUser(): Promise<SessionUser | null> {
  // both states are taken before the await: after it, the Nuxt instance is no longer current on the server
  const state = useSessionUser()
  const known = useSessionKnown()
  try {
    state.value = await useRequestFetch()<SessionUser>('/api/auth/me')
  } catch {
    state.value = null
  }
  known.value = true
  return state.value
}

/** The message a failed $fetch carries from the server (createError's message), for display. */
export function errorMessage(err: unknown): string {
  const e = err as { data?: { message?: string }, message?: string }
  return e?.data?.message ?? e?.message ?? 'Something went wrong. Try again.'
}
