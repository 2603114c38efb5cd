// Mail and sign-up volume (server/utils/volume-limit.ts) on a second built server with the default limits (the
// shared test server raises the per-address ones, since every test signs up from 127.0.0.1). Client addresses
// come from X-Forwarded-For (LENSFIELD_TRUST_PROXY=1), RFC 5737 documentation addresses.
import { spawn, type ChildProcess } from 'node:child_process'
import { join } from 'node:path'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { freePort, repoRoot } from '../../scripts/postgres'
import { waitForHttp } from '../../scripts/run'
import { ApiClient, uniqueEmail } from './client'

let child: ChildProcess
let url: string
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })

beforeAll(async () => {
  const port = await freePort()
  url = `http://127.0.0.1:${port}`
  const env = { ...process.env }
  delete env.LENSFIELD_SIGN_UPS_PER_ADDRESS_HOUR
  delete env.LENSFIELD_INVITATIONS_PER_ADDRESS_HOUR
  child = spawn(process.execPath, [join(repoRoot, '.output', 'server', 'index.mjs')], {
    env: { ...env, DATABASE_URL: inject('databaseUrl'), HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production',
      NUXT_PUBLIC_DEMO_MODE: 'true', LENSFIELD_EMBEDDED_WORKER: '0', LENSFIELD_TRUST_PROXY: '1', LENSFIELD_PUBLIC_URL: url },
    stdio: 'ignore',
  })
  await waitForHttp(`${url}/api/health`, 30_000)
})
afterAll(async () => {
  child?.kill('SIGTERM')
  await pool.end()
})

function client(address: string) {
  const c = new ApiClient(url)
  c.headers['x-forwarded-for'] = address
  return c
}
async function lead(tag: string, address: string) {
  const c = client(address)
  const r = await c.post('/api/auth/sign-up', { email: uniqueEmail(tag), name: `=HYPERLINK("x") ${tag}`, password: `pw-${tag}-long-enough` })
  expect(r.status).toBe(201)
  return { c, teamId: r.body.teamId as string }
}

describe('sign-ups per address', () => {
  it('6 sign-ups at the same moment from one address: 5 accounts, then 429 with Retry-After; another address is served', async () => {
    const replies = await Promise.all(Array.from({ length: 6 }, (_, i) =>
      client('198.51.100.1').post('/api/auth/sign-up', { email: uniqueEmail(`burst${i}`), name: 'Burst', password: 'burst-long-password' })))
    expect(replies.map((r) => r.status).sort()).toEqual([201, 201, 201, 201, 201, 429])
    const refused = replies.find((r) => r.status === 429)!
    expect(refused.body.message).toMatch(/Too many new accounts from your network/)
    expect(refused.body.data.retryAfterSeconds).toBeGreaterThan(3000)
    expect((await client('198.51.100.2').post('/api/auth/sign-up', { email: uniqueEmail('calm'), name: 'Calm', password: 'calm-long-password' })).status).toBe(201)
  })
})

describe('invitations', () => {
  it('one open invitation per address and team (any letter case); withdrawn, it may be sent again', async () => {
    const { c, teamId } = await lead('pending', '198.51.100.10')
    const email = uniqueEmail('invitee')
    const first = await c.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' })
    expect(first.status).toBe(201)
    const again = await c.post(`/api/teams/${teamId}/invitations`, { email: email.toUpperCase(), role: 'designer' })
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/already has an open invitation/)
    expect((await c.delete(`/api/invitations/${first.body.invitation.id}`)).status).toBe(200)
    expect((await c.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' })).status).toBe(201)
  })

  it('five identical invitations sent at the same instant: one 201, four 409 (checked under a lock on team and address)', async () => {
    const { c, teamId } = await lead('race', '198.51.100.12')
    const email = uniqueEmail('raced')
    const replies = await Promise.all(Array.from({ length: 5 }, () => c.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' })))
    expect(replies.map((r) => r.status).sort()).toEqual([201, 409, 409, 409, 409])
    const { rows } = await pool.query('SELECT count(*)::int AS n FROM invitations WHERE team_id = $1 AND lower(email) = lower($2)', [teamId, email])
    expect(rows[0].n).toBe(1)
  })

  it('the subject carries no text the inviter chose', async () => {
    const { c, teamId } = await lead('subject', '198.51.100.11')
    const email = uniqueEmail('subj')
    expect((await c.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' })).status).toBe(201)
    const { rows } = await pool.query('SELECT subject FROM mailbox_messages WHERE rcpt_to ? $1', [email.toLowerCase()])
    expect(rows.map((r) => r.subject)).toEqual(['A team on Lensfield invites you'])
  })

  it('22 invitations at once from one team: 20 sent, 2 refused (429); then the address cap (30 an hour) stops a second team', async () => {
    const a = await lead('burst-a', '198.51.100.20')
    const b = await lead('burst-b', '198.51.100.21')
    for (const l of [a, b]) l.c.headers['x-forwarded-for'] = '198.51.100.22'
    const burst = await Promise.all(Array.from({ length: 22 }, () => a.c.post(`/api/teams/${a.teamId}/invitations`, { email: uniqueEmail('many'), role: 'viewer' })))
    expect(burst.filter((r) => r.status === 201)).toHaveLength(20)
    expect(burst.filter((r) => r.status === 429).map((r) => r.body.message)).toEqual(Array(2).fill(expect.stringMatching(/This team has sent its 20 invitations/)))
    // The address has 20 (the team's refusals were not counted against it); team B may add 10 more from it.
    const fromB = []
    for (let i = 0; i < 11; i++) fromB.push(await b.c.post(`/api/teams/${b.teamId}/invitations`, { email: uniqueEmail('more'), role: 'viewer' }))
    expect(fromB.map((r) => r.status)).toEqual([...Array(10).fill(201), 429])
    expect(fromB[10]!.body.message).toMatch(/Too many invitations from your network/)
  }, 60_000)
})
