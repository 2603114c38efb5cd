// Invitations and password reset end to end through the fake SMTP server (scripts/fake-smtp.ts, started by the
// global setup): the mail is captured in Postgres, the link in it is followed, and every reuse is refused.
import pg from 'pg'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { ApiClient, signedUpClient, uniqueEmail } from './client'
import { linkIn, mailCount, waitForMail } from './mail'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
afterAll(() => pool.end())

const tokenOf = (link: string) => link.split('/').pop()!

describe('invitations', () => {
  it('mails a single-use link; accepting creates the account with the role; reuse is refused', async () => {
    const lead = await signedUpClient('inv-lead')
    const email = uniqueEmail('inv-new')
    const res = await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email, role: 'designer' })
    expect(res.status).toBe(201)
    expect(JSON.stringify(res.body)).not.toMatch(/invitations\/[A-Za-z0-9_-]{20,}/) // the link goes by mail only

    const mail = await waitForMail(pool, email, 'invites you')
    const link = linkIn(mail, '/invitations/')
    expect(link.startsWith(inject('baseUrl'))).toBe(true)
    const token = tokenOf(link)
    const { rows: [stored] } = await pool.query('SELECT token_hash, expires_at, created_at FROM invitations WHERE id = $1', [res.body.invitation.id])
    expect(stored.token_hash).not.toContain(token) // stored hashed
    expect((stored.expires_at - stored.created_at) / 86_400_000).toBeCloseTo(7, 3)

    const invitee = new ApiClient()
    const preview = await invitee.get(`/api/invitations/preview?token=${token}`)
    expect(preview.status).toBe(200)
    expect(preview.body.invitation).toMatchObject({ email, role: 'designer', accountExists: false })
    const missing = await invitee.post('/api/invitations/accept', { token })
    expect(missing.status).toBe(400)
    const accepted = await invitee.post('/api/invitations/accept', { token, name: 'New Designer', password: 'a-long-password-1' })
    expect(accepted.status).toBe(200)
    expect(accepted.body).toMatchObject({ role: 'designer', teamId: lead.teamId, created: true })
    const me = await invitee.get('/api/auth/me')
    expect(me.body.teams.find((t: { id: string }) => t.id === lead.teamId)?.role).toBe('designer')

    const again = await new ApiClient().post('/api/invitations/accept', { token, name: 'Someone', password: 'another-password-2' })
    expect(again.status).toBe(410)
    expect(again.body.message).toMatch(/already used/)
    const { rows: [count] } = await pool.query('SELECT count(*)::int AS n FROM users WHERE email = $1', [email])
    expect(count.n).toBe(1)
  })

  it('an expired link is refused and joins nobody', async () => {
    const lead = await signedUpClient('inv-exp')
    const email = uniqueEmail('inv-late')
    const res = await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email, role: 'viewer' })
    expect(res.status).toBe(201)
    const token = tokenOf(linkIn(await waitForMail(pool, email, 'invites you'), '/invitations/'))
    await pool.query(`UPDATE invitations SET expires_at = now() - interval '1 second' WHERE id = $1`, [res.body.invitation.id])
    const r = await new ApiClient().post('/api/invitations/accept', { token, name: 'Late', password: 'a-long-password-1' })
    expect(r.status).toBe(410)
    expect(r.body.message).toMatch(/expired/)
    const { rows } = await pool.query('SELECT 1 FROM users WHERE email = $1', [email])
    expect(rows).toHaveLength(0)
  })

  it('an existing account joins with the role after signing in, and only with the invited e-mail', async () => {
    const lead = await signedUpClient('inv-lead2')
    const other = await signedUpClient('inv-existing')
    const stranger = await signedUpClient('inv-stranger')
    const res = await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email: other.email, role: 'viewer' })
    const token = tokenOf(linkIn(await waitForMail(pool, other.email, 'invites you'), '/invitations/'))
    expect((await new ApiClient().post('/api/invitations/accept', { token, name: 'X', password: 'a-long-password-1' })).status).toBe(409)
    expect((await stranger.client.post('/api/invitations/accept', { token })).status).toBe(403)
    const ok = await other.client.post('/api/invitations/accept', { token })
    expect(ok.status).toBe(200)
    expect(ok.body).toMatchObject({ created: false, role: 'viewer' })
    expect(res.status).toBe(201)
  })

  it('only a lead invites; a withdrawn invitation is refused', async () => {
    const lead = await signedUpClient('inv-lead3')
    const email = uniqueEmail('inv-designer')
    await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email, role: 'designer' })
    const designer = new ApiClient()
    const token = tokenOf(linkIn(await waitForMail(pool, email, 'invites you'), '/invitations/'))
    await designer.post('/api/invitations/accept', { token, name: 'D', password: 'a-long-password-1' })
    const refused = await designer.post(`/api/teams/${lead.teamId}/invitations`, { email: uniqueEmail('x'), role: 'viewer' })
    expect(refused.status).toBe(403)
    const outsider = await signedUpClient('inv-outsider')
    expect((await outsider.client.post(`/api/teams/${lead.teamId}/invitations`, { email: uniqueEmail('y'), role: 'viewer' })).status).toBe(404)

    const email2 = uniqueEmail('inv-withdrawn')
    const inv = await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email: email2, role: 'viewer' })
    const token2 = tokenOf(linkIn(await waitForMail(pool, email2, 'invites you'), '/invitations/'))
    expect((await lead.client.delete(`/api/invitations/${inv.body.invitation.id}`)).status).toBe(200)
    const r = await new ApiClient().post('/api/invitations/accept', { token: token2, name: 'W', password: 'a-long-password-1' })
    expect(r.status).toBe(410)
    expect(r.body.message).toMatch(/withdrawn/)
  })
})

describe('password reset', () => {
  it('mails a single-use link; the new password works, the old one and the old session do not', async () => {
    const acct = await signedUpClient('reset')
    const r = await new ApiClient().post('/api/auth/password-reset/request', { email: acct.email })
    expect(r.status).toBe(202)
    const token = tokenOf(linkIn(await waitForMail(pool, acct.email, 'Reset your'), '/reset-password/'))
    const c = new ApiClient()
    expect((await c.post('/api/auth/password-reset/confirm', { token, password: 'brand-new-password-9' })).status).toBe(200)
    expect((await acct.client.get('/api/auth/me')).status).toBe(401) // old session ended
    expect((await new ApiClient().post('/api/auth/sign-in', { email: acct.email, password: acct.password })).status).toBe(401)
    expect((await new ApiClient().post('/api/auth/sign-in', { email: acct.email, password: 'brand-new-password-9' })).status).toBe(200)
    expect((await new ApiClient().post('/api/auth/password-reset/confirm', { token, password: 'third-password-99' })).status).toBe(410)
  })

  it('answers an unknown address exactly like a known one and sends nothing', async () => {
    const known = await signedUpClient('reset-known')
    const unknown = uniqueEmail('reset-nobody')
    const a = await new ApiClient().post('/api/auth/password-reset/request', { email: known.email })
    const b = await new ApiClient().post('/api/auth/password-reset/request', { email: unknown })
    expect(a.status).toBe(b.status)
    expect(a.body.message.replace(known.email, 'X')).toBe(b.body.message.replace(unknown, 'X'))
    await waitForMail(pool, known.email, 'Reset your')
    expect(await mailCount(pool, unknown)).toBe(0)
  })

  it('sends at most 3 links an hour to one account, with the same reply every time', async () => {
    const acct = await signedUpClient('reset-flood')
    const replies = []
    for (let i = 0; i < 5; i++) replies.push(await new ApiClient().post('/api/auth/password-reset/request', { email: acct.email }))
    expect(replies.map((r) => r.status)).toEqual([202, 202, 202, 202, 202])
    expect(new Set(replies.map((r) => r.body.message)).size).toBe(1)
    await waitForMail(pool, acct.email, 'Reset your', 3)
    // The mails go out after each reply; give the last two requests time to (not) send.
    await new Promise((r) => setTimeout(r, 1500))
    expect(await mailCount(pool, acct.email)).toBe(3)
  })

  it('an expired reset link is refused', async () => {
    const acct = await signedUpClient('reset-exp')
    await new ApiClient().post('/api/auth/password-reset/request', { email: acct.email })
    const token = tokenOf(linkIn(await waitForMail(pool, acct.email, 'Reset your'), '/reset-password/'))
    await pool.query(`UPDATE password_resets SET expires_at = now() - interval '1 second' WHERE user_id = $1`, [acct.userId])
    expect((await new ApiClient().post('/api/auth/password-reset/confirm', { token, password: 'brand-new-password-9' })).status).toBe(410)
  })
})

describe('development mailbox', () => {
  it('lists captured mail in demo mode (the test server runs in demo mode)', async () => {
    const lead = await signedUpClient('mbox')
    const email = uniqueEmail('mbox-to')
    await lead.client.post(`/api/teams/${lead.teamId}/invitations`, { email, role: 'viewer' })
    await waitForMail(pool, email, 'invites you')
    const r = await lead.client.get('/api/dev/mailbox?limit=500')
    expect(r.status).toBe(200)
    const m = r.body.messages.find((x: { to: string[] }) => x.to.includes(email))
    expect(m.subject).toBe('A team on Lensfield invites you') // no user-chosen text in the subject
    expect(m.text).toMatch(/as viewer/)
  })
})

describe('outside demo and development mode', () => {
  it('the mailbox route and page answer 404 (a second built server, demo mode off)', async () => {
    const { spawn } = await import('node:child_process')
    const { join } = await import('node:path')
    const { freePort, repoRoot } = await import('../../scripts/postgres')
    const { waitForHttp } = await import('../../scripts/run')
    const port = await freePort()
    const child = spawn(process.execPath, [join(repoRoot, '.output', 'server', 'index.mjs')], {
      env: { ...process.env, DATABASE_URL: inject('databaseUrl'), HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production', NUXT_PUBLIC_DEMO_MODE: 'false', LENSFIELD_EMBEDDED_WORKER: '0' },
      stdio: 'ignore',
    })
    try {
      const url = `http://127.0.0.1:${port}`
      await waitForHttp(`${url}/api/health`, 30_000)
      expect((await fetch(`${url}/api/dev/mailbox`)).status).toBe(404)
      expect((await fetch(`${url}/dev/mailbox`)).status).toBe(404)
      // The control: on the demo-mode test server the route exists (and wants a session).
      expect((await fetch(`${inject('baseUrl')}/api/dev/mailbox`)).status).toBe(401)
    } finally {
      child.kill('SIGTERM')
    }
  })
})
