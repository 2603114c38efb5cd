// Sign-in hardening against the built server: throttling per account and per client address (5 and 20 failures
// in 15 minutes, OWASP Authentication Cheat Sheet "login throttling": common practice), one answer for every
// failure, and a new session on every sign-in with the old one ended. Addresses come from X-Forwarded-For (the test
// server trusts it) in the documentation ranges of RFC 5737, so no test blocks another.
import { describe, expect, it } from 'vitest'
import { ApiClient, signedUpClient, uniqueEmail } from './client'

function from(address: string) {
  const c = new ApiClient()
  c.headers['x-forwarded-for'] = address
  return c
}

describe('sign-in throttling', () => {
  it('after 5 failures on one account, even the right password gets 429 with a retry time; other accounts are unaffected', async () => {
    const victim = await signedUpClient('throttled')
    const other = await signedUpClient('bystander')
    const c = from('198.51.100.10')
    for (let i = 0; i < 5; i++) {
      const r = await c.post('/api/auth/sign-in', { email: victim.email, password: `wrong-${i}-xxxxxxxx` })
      expect(r.status).toBe(401)
    }
    const blocked = await c.post('/api/auth/sign-in', { email: victim.email, password: victim.password })
    expect(blocked.status).toBe(429)
    expect(blocked.body.message).toMatch(/Too many failed sign-ins\. Try again in \d+ minute/)
    const res = await fetch(`${c.baseUrl}/api/auth/sign-in`, {
      method: 'POST', headers: { 'content-type': 'application/json', origin: c.baseUrl, 'x-forwarded-for': '198.51.100.11' },
      body: JSON.stringify({ email: victim.email.toUpperCase(), password: victim.password }),
    })
    // Counted per account whatever the address and the letter case: still blocked, with Retry-After ≤ 15 min.
    expect(res.status).toBe(429)
    const retry = Number(res.headers.get('retry-after'))
    expect(retry).toBeGreaterThan(0)
    expect(retry).toBeLessThanOrEqual(15 * 60)
    expect((await from('198.51.100.10').post('/api/auth/sign-in', { email: other.email, password: other.password })).status).toBe(200)
  })

  it('after 20 failures from one address, that address is refused; another address signs in', async () => {
    const user = await signedUpClient('address')
    const c = from('203.0.113.20')
    for (let i = 0; i < 20; i++) {
      const r = await c.post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: 'not-the-password-1' })
      expect(r.status).toBe(401)
    }
    expect((await c.post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(429)
    expect((await from('203.0.113.21').post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(200)
  })

  it('gives the same answer for an unknown e-mail and a wrong password', async () => {
    const user = await signedUpClient('enumerate')
    const a = await from('198.51.100.30').post('/api/auth/sign-in', { email: user.email, password: 'wrong-password-123' })
    const b = await from('198.51.100.31').post('/api/auth/sign-in', { email: uniqueEmail('ghost'), password: 'wrong-password-123' })
    expect(a.status).toBe(401)
    expect(b.status).toBe(a.status)
    expect(b.body.message).toBe(a.body.message)
  })
})

describe('sessions', () => {
  it('a sign-in issues a new session and ends the one the browser carried; sign-out ends the new one', async () => {
    const user = await signedUpClient('rotate')
    const c = from('198.51.100.40')
    expect((await c.post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(200)
    const first = c.cookie
    expect((await c.post('/api/auth/sign-in', { email: user.email, password: user.password })).status).toBe(200)
    const second = c.cookie
    expect(second).not.toBe(first)
    const old = new ApiClient()
    old.cookie = first
    expect((await old.get('/api/auth/me')).status).toBe(401)
    expect((await c.get('/api/auth/me')).status).toBe(200)
    expect((await c.post('/api/auth/sign-out')).status).toBeLessThan(300)
    const after = new ApiClient()
    after.cookie = second
    expect((await after.get('/api/auth/me')).status).toBe(401)
  })
})
