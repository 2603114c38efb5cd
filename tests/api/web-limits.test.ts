// Abuse limits and the error layer, against the built server: documented statuses instead of 500s (duplicate
// names 409, out-of-range integers 400), names without bidi controls, Origin compared with its scheme, the
// development mailbox limited to the reader's own mail, CSV exports whose user text cannot become a formula, and
// the connection limits of the production entry (server/entry/node-server.ts).
import net from 'node:net'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { ApiClient, signedUpClient, uniqueEmail, validScenario } from './client'
import { waitFor } from './jobs'
import { rawRequest, waitForMail } from './mail'
import { FORMULA_START, readCsv } from '../support/csv-reader'

const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let owner: Awaited<ReturnType<typeof signedUpClient>>
let projectId: string
let designId: string
let runId: string
// A name made to break a CSV line into formula fields (OWASP "CSV Injection" example shape).
const HOSTILE_NAME = '=HYPERLINK("http://x.example"),@SUM(A1),+1'

beforeAll(async () => {
  owner = await signedUpClient('limits')
  const p = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Limits' })
  projectId = p.body.project.id
  const d = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Caps', scenario: validScenario })
  designId = d.body.design.id
  // Created only (no worker runs in this file): the cell and its scenario exist at once.
  const r = await owner.client.post('/api/runs', { designId, name: HOSTILE_NAME, precision: { rays: 10_000 } })
  expect(r.status).toBe(201)
  runId = r.body.run.id
})
afterAll(async () => {
  await pool.end()
})

describe('duplicate names answer 409 with a sentence, not 500', () => {
  it('project', async () => {
    const again = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Limits' })
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/already has a project called "Limits"/)
  })
  it('design, on create and on rename', async () => {
    const again = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Caps', scenario: validScenario })
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/already has a design called "Caps"/)
    const other = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Caps 2', scenario: validScenario })
    const renamed = await owner.client.patch(`/api/designs/${other.body.design.id}`, { name: 'Caps' })
    expect(renamed.status).toBe(409)
  })
  it('uploaded table', async () => {
    const up = () => rawRequest(baseUrl, 'POST', `/api/projects/${projectId}/tables?kind=lens_profile&name=Trace&fileName=t.csv`, {
      headers: { cookie: owner.client.cookie, origin: baseUrl, 'content-type': 'text/csv' }, body: 'r_um,height_um\n0,2\n1,1\n2,0\n',
    })
    expect((await up()).status).toBe(201)
    const again = await up()
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/Trace/)
  })
  it('account e-mail', async () => {
    const again = await new ApiClient().post('/api/auth/sign-up', { email: owner.email, name: 'Twin', password: 'another-long-password' })
    expect(again.status).toBe(409)
    expect(again.body.message).toMatch(/already exists: sign in instead/)
  })
  it('two sign-ups with one e-mail at the same moment: one 201, the other 409 (the unique index decides)', async () => {
    const email = uniqueEmail('race')
    const replies = await Promise.all([0, 1, 2].map(() => new ApiClient().post('/api/auth/sign-up', { email, name: 'Race', password: 'race-long-password' })))
    expect(replies.map((r) => r.status).sort()).toEqual([201, 409, 409])
  })
})

describe('integers beyond PostgreSQL integer answer 400 naming the field', () => {
  const BIG = 2147483648 // 2³¹: one past int4's maximum (PostgreSQL manual, "Numeric Types")
  it.each(['', '/export?format=csv', '/surface?format=sag'])('cell index %s', async (suffix) => {
    const r = await owner.client.get(`/api/runs/${runId}/cells/${BIG}${suffix}`)
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(/cell index must be at most 2147483647/)
  })
  it('shortlist cellIndex', async () => {
    const r = await owner.client.post(`/api/projects/${projectId}/shortlist`, { runId, cellIndex: 1e12, note: 'x' })
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(/cellIndex must be at most/)
  })
  it('design baseVersion', async () => {
    const r = await owner.client.patch(`/api/designs/${designId}`, { name: 'Caps v', baseVersion: 1e12 })
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(/baseVersion must be at most/)
  })
})

describe('names and origins', () => {
  it('bidi controls (U+202E and kin) are removed from names', async () => {
    const p = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Film \u202Eevil\u202C \u2066x\u2069' })
    expect(p.status).toBe(201)
    expect(p.body.project.name).toBe('Film evil x')
  })
  it('an https Origin is another site for this http server (scheme compared, RFC 6454)', async () => {
    const host = new URL(baseUrl).host
    const r = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Via https' }, { origin: `https://${host}` })
    expect(r.status).toBe(403)
    expect((await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Via http' })).status).toBe(201)
  })
})

describe('development mailbox', () => {
  it('needs a session and shows only mail addressed to the reader', async () => {
    expect((await new ApiClient().get('/api/dev/mailbox')).status).toBe(401)
    const other = await signedUpClient('mailbox-other')
    // A reset link for `other`, requested signed out, as anyone could.
    expect((await new ApiClient().post('/api/auth/password-reset/request', { email: other.email })).status).toBe(202)
    await waitForMail(pool, other.email, 'password')
    const mine = await owner.client.get('/api/dev/mailbox?limit=500')
    expect(mine.status).toBe(200)
    expect(mine.body.messages.every((m: { to: string[] }) => m.to.map((a) => a.toLowerCase()).includes(owner.email.toLowerCase()))).toBe(true)
    const theirs = await other.client.get('/api/dev/mailbox?limit=500')
    expect(theirs.body.messages.some((m: { subject: string }) => /password/i.test(m.subject))).toBe(true)
  })
})

describe('CSV exports: user text stays one field and never starts a formula (read back by Python\'s csv module)', () => {
  it('the sag table carries the hostile run name as one neutralised field', async () => {
    const r = await rawRequest(baseUrl, 'GET', `/api/runs/${runId}/cells/0/surface?format=sag&points=5`, { headers: { cookie: owner.client.cookie } })
    expect(r.status).toBe(200)
    const rows = readCsv(r.bytes)
    for (const row of rows) for (const field of row) expect(field).not.toMatch(FORMULA_START)
    expect(rows[0]).toEqual(['# Lensfield sag table', `'${HOSTILE_NAME} cell 0`])
    expect(rows.find((row) => row[0] === 'r_um')).toEqual(['r_um', 'height_um', 'sag_um'])
  })
})

describe('progress streams (SSE) are capped per session/token and per address', () => {
  // Opens a stream of the (queued, so never-ending) run; resolves with the status once the headers are in.
  const streams: AbortController[] = []
  const openStream = async (headers: Record<string, string>) => {
    const ac = new AbortController()
    const res = await fetch(`${baseUrl}/api/runs/${runId}/events`, { headers: { accept: 'text/event-stream', ...headers }, signal: ac.signal })
    if (res.status === 200) streams.push(ac)
    const message = res.status === 200 ? '' : String((JSON.parse(await res.text()) as { message?: string }).message)
    return { status: res.status, res, ac, message }
  }
  afterAll(() => { for (const ac of streams) ac.abort() })

  it('the 21st stream of one session is refused with 429 and Retry-After; closing one frees its slot', async () => {
    const headers = { cookie: owner.client.cookie, 'x-forwarded-for': '203.0.113.10' } // RFC 5737 documentation address
    const first = await Promise.all(Array.from({ length: 20 }, () => openStream(headers)))
    expect(first.map((s) => s.status)).toEqual(Array(20).fill(200))
    const over = await openStream(headers)
    expect(over.status).toBe(429)
    expect(over.res.headers.get('retry-after')).toBe('10')
    expect(over.message).toMatch(/in this session \(at most 20\)/)
    first[0]!.ac.abort()
    const again = await waitFor('the closed stream\'s slot to be free', async () => {
      const s = await openStream(headers)
      return s.status === 200 ? s : null
    })
    expect(again.status).toBe(200)
  })

  it('one address may hold 60 streams across tokens; the 61st is refused', async () => {
    const tokens = await Promise.all([1, 2, 3, 4].map(async (i) => (await owner.client.post('/api/account/tokens', { name: `sse ${i}` })).body.token as string))
    const from = { 'x-forwarded-for': '203.0.113.11' }
    const opened = await Promise.all(Array.from({ length: 60 }, (_, i) => openStream({ ...from, authorization: `Bearer ${tokens[i % 3]}` })))
    expect(opened.filter((s) => s.status === 200)).toHaveLength(60)
    const over = await openStream({ ...from, authorization: `Bearer ${tokens[3]}` })
    expect(over.status).toBe(429)
    expect(over.message).toMatch(/from your address \(at most 60\)/)
  })
})

describe('connections (server/entry/node-server.ts)', () => {
  const { hostname, port } = new URL(baseUrl)
  const open = (localAddress: string) => new Promise<net.Socket>((resolve, reject) => {
    const s = net.connect({ host: hostname, port: Number(port), localAddress })
    s.once('connect', () => resolve(s)).once('error', reject)
  })
  const closed = (s: net.Socket) => new Promise<string>((resolve) => {
    let data = ''
    s.on('data', (d) => { data += d.toString() }).on('error', () => {}).once('close', () => resolve(data))
  })

  it('a client over its cap of open sockets is cut off; others, and /api/health, are not', async () => {
    const cap = 256 // LENSFIELD_MAX_CONNECTIONS_PER_ADDRESS default
    // Loopback answers the whole 127/8 (RFC 1122 §3.2.1.3), so this flood comes from an address of its own.
    const gone = new Set<net.Socket>()
    const sockets = await Promise.all(Array.from({ length: cap + 20 }, async () => {
      const s = await open('127.0.0.77')
      s.on('error', () => {}).once('close', () => gone.add(s))
      return s
    }))
    await waitFor('the server to close the sockets over the cap', async () => gone.size >= 20)
    expect(gone.size).toBe(20)
    // The flooding address is refused more; another is served.
    const probe = await open('127.0.0.77')
    await closed(probe)
    expect((await fetch(`${baseUrl}/api/health`)).status).toBe(200)
    for (const s of sockets) s.destroy()
  })

  it('a body that never arrives is answered 408 and the socket closed (request timeout)', async () => {
    const s = await open('127.0.0.78')
    const reply = closed(s)
    s.write(`POST /api/auth/sign-in HTTP/1.1\r\nHost: ${hostname}:${port}\r\nOrigin: ${baseUrl}\r\nContent-Type: application/json\r\nContent-Length: 100\r\n\r\n{"email":`)
    expect((await reply).split('\r\n')[0]).toMatch(/^HTTP\/1.1 408/)
  }, 60_000)

  it('a socket that sends no headers is closed (headers timeout)', async () => {
    const s = await open('127.0.0.79')
    s.write('GET /api/health HTTP/1.1\r\nHost: x\r\n')
    const reply = await closed(s)
    expect(reply === '' || /^HTTP\/1.1 408/.test(reply)).toBe(true)
  }, 60_000)
})
