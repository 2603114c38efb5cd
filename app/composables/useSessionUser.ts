// The signed-in user and their teams, fetched once per page load (SSR forwards the cookie) and shared.
export interface SessionUser {
  user: { id: string, email: string, name: string }
  teams: { id: string, name: string, slug: string, role: 'lead' | 'designer' | 'viewer' }[]
}

export function useSessionUser() {
  return useState<SessionUser | null>('session-user', () => null)
}

/** Loads /api/auth/me into the shared state; null when signed out. */
export async function refreshSessionUser(): Promise<SessionUser | null> {
  const state = useSessionUser()
  try {
    state.value = await useRequestFetch()<SessionUser>('/api/auth/me')
  } catch {
    state.value = null
  }
  return state.value
}

/** The message a failed $fetch carries from the server (createError's message), for display. */
export function errorMessage(err: unknown): string {
  const e = err as { data?: { message?: string }, message?: string }
  return e?.data?.message ?? e?.message ?? 'Something went wrong. Try again.'
}
