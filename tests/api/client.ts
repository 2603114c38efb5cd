// A tiny HTTP client for the api tests: JSON in and out, a cookie jar of one session, and a same-site Origin
// header on every request unless the test says otherwise.
import { inject } from 'vitest'

export interface Reply<T = any> {
  status: number
  body: T
  setCookie: string[]
}

export class ApiClient {
  cookie = ''
  /** Sent with every request (e.g. X-Forwarded-For to act from another client address). */
  headers: Record<string, string> = {}
  constructor(readonly baseUrl: string = inject('baseUrl')) {}

  async request<T = any>(method: string, path: string, body?: unknown, opts: { origin?: string | null } = {}): Promise<Reply<T>> {
    const headers: Record<string, string> = { accept: 'application/json', ...this.headers }
    if (body !== undefined) headers['content-type'] = 'application/json'
    const origin = opts.origin === undefined ? this.baseUrl : opts.origin
    if (origin !== null) headers.origin = origin
    if (this.cookie) headers.cookie = this.cookie
    const res = await fetch(this.baseUrl + path, {
      method,
      headers,
      body: body === undefined ? undefined : JSON.stringify(body),
      redirect: 'manual',
    })
    const setCookie = res.headers.getSetCookie()
    for (const c of setCookie) {
      const [pair] = c.split(';')
      const [name, value] = pair!.split('=')
      if (name === 'lensfield_session') this.cookie = value ? `${name}=${value}` : ''
    }
    const text = await res.text()
    let parsed: unknown = text
    try {
      parsed = text ? JSON.parse(text) : null
    } catch { /* not JSON: keep the text */ }
    return { status: res.status, body: parsed as T, setCookie }
  }

  get<T = any>(path: string) { return this.request<T>('GET', path) }
  post<T = any>(path: string, body?: unknown, opts?: { origin?: string | null }) { return this.request<T>('POST', path, body ?? {}, opts) }
  patch<T = any>(path: string, body?: unknown) { return this.request<T>('PATCH', path, body ?? {}) }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path) }
}

let counter = 0
/** A unique e-mail per call, so tests never collide within one throwaway database. */
export function uniqueEmail(tag: string) {
  counter += 1
  return `${tag}.${Date.now().toString(36)}.${counter}@tests.example`
}

/** Signs up a fresh account (its own team, as lead) and returns a client holding its session. */
export async function signedUpClient(tag: string) {
  const client = new ApiClient()
  const email = uniqueEmail(tag)
  const password = `pw-${tag}-correct-horse`
  const res = await client.post('/api/auth/sign-up', { email, name: `Test ${tag}`, password })
  if (res.status !== 201) throw new Error(`sign-up failed: ${res.status} ${JSON.stringify(res.body)}`)
  return { client, email, password, teamId: res.body.teamId as string, userId: res.body.user.id as string }
}

export const validScenario = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 1000000, seed: 1, fresnel: 'averaged' },
}
