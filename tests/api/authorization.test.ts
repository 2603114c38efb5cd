// The authorisation matrix (issue 7): every API route × six actors × two targets, with the expected status of every
// cell written down below. The route list is generated from the files under server/api (method from the file name,
// path from the folders), so a route added without a row in MATRIX and a request in REQUESTS fails this file.
//
// Actors: lead, designer and viewer of team A; the lead of team B ("outsider" to team A); a client without a session
// ("anon", but with a same-site Origin, so its 401 comes from the missing session and not from the Origin check); and
// an API token of team A's designer ("token", sent without Origin or cookie: a bearer request needs neither).
// Targets: team A's resources ("own") and team B's resources ("other"). An outsider's "other" cell is its own team,
// which also shows that every team-B fixture is a real, reachable resource (so a 404 elsewhere means "not yours").
// Routes that name no team resource (health, sign-in, the token list, …) have one status per actor.
//
// Every cell that deletes, cancels or chooses works on a resource made for it, so cells are independent and their
// order does not matter. Bodies are small and valid, so an allowed write answers 2xx rather than 400.
import { readdirSync } from 'node:fs'
import { join } from 'node:path'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { ApiClient, signedUpClient, uniqueEmail, validScenario } from './client'
import { startWorkerProcess, waitForRunEnd } from './jobs'
import { repoRoot } from '../../scripts/postgres'

const ACTORS = ['lead', 'designer', 'viewer', 'outsider', 'anon', 'token'] as const
type ActorName = (typeof ACTORS)[number]
type TargetName = 'own' | 'other'
/** [own, other] for a route on a team's resource; one number for a route that names none. */
type Cell = number | readonly [number, number]
type Row = Readonly<Record<ActorName, Cell>>

// ---------------------------------------------------------------------------------------------------------------
// The expected answers. Column order: lead, designer, viewer (team A), outsider (lead of team B), anon, token (A's
// designer). [own, other] = [team A's resource, team B's resource].
const R = (lead: Cell, designer: Cell, viewer: Cell, outsider: Cell, anon: Cell, token: Cell): Row =>
  ({ lead, designer, viewer, outsider, anon, token })
/** Any member reads; another team's resource is 404, as if missing. */
const READ = (ok = 200) => R([ok, 404], [ok, 404], [ok, 404], [404, ok], [401, 401], [ok, 404])
/** Lead and designer write; a viewer is refused with 403. */
const EDIT = (ok: number) => R([ok, 404], [ok, 404], [403, 404], [404, ok], [401, 401], [ok, 404])
/** Any member writes (shortlist bookmarks, comments). */
const MEMBER = (ok: number) => READ(ok)
/** Only a lead (choose/unchoose, invitations). The token is the designer's, so it is refused like the designer. */
const LEAD = (ok: number) => R([ok, 404], [403, 404], [403, 404], [404, ok], [401, 401], [403, 404])
/** The author of a shortlist entry (team A: the designer; team B: its lead) or a lead. */
const AUTHOR_OR_LEAD = (ok: number) => R([ok, 404], [ok, 404], [403, 404], [404, ok], [401, 401], [ok, 404])
/** The same for every actor (public routes). */
const ALL = (s: number) => R(s, s, s, s, s, s)

const MATRIX: Record<string, Row> = {
  // Account tokens: session only (a token cannot list, mint or revoke tokens: requireSessionAuth → 403).
  'GET /api/account/tokens': R(200, 200, 200, 200, 401, 403),
  'POST /api/account/tokens': R(201, 201, 201, 201, 401, 403),
  // Target: a fresh token of team A's designer / of team B's lead. Only its owner revokes it; anyone else gets 404.
  'DELETE /api/account/tokens/:id': R([404, 404], [200, 404], [404, 404], [404, 200], [401, 401], [403, 403]),

  // Public and account routes.
  'GET /api/health': ALL(200),
  'GET /api/auth/me': R(200, 200, 200, 200, 401, 200),
  'POST /api/auth/sign-in': ALL(401), // wrong password, from an address of its own
  'POST /api/auth/sign-up': ALL(201), // a new e-mail
  'POST /api/auth/sign-out': ALL(200), // on a session made for the cell
  'POST /api/auth/password-reset/request': ALL(202), // same answer whether or not the address has an account
  'POST /api/auth/password-reset/confirm': ALL(410), // a well-formed but unknown link token
  'GET /api/invitations/preview': ALL(404), // unknown link token
  'POST /api/invitations/accept': ALL(404), // unknown link token
  'GET /api/demo/accounts': ALL(200), // the api tests run in demo mode
  // Demo mode only (404 otherwise); signed in, and only the user's own mail (server/utils/mailbox.ts).
  'GET /api/dev/mailbox': R(200, 200, 200, 200, 401, 200),

  // Projects and designs.
  'GET /api/projects': R(200, 200, 200, 200, 401, 200),
  'POST /api/projects': EDIT(201), // target: teamId of team A / team B
  'GET /api/projects/:id': READ(),
  'PATCH /api/projects/:id': LEAD(200), // the project's fabrication limits: lead only
  'GET /api/projects/:id/designs': READ(),
  'POST /api/projects/:id/designs': EDIT(201),
  'GET /api/designs/:id': READ(),
  'PATCH /api/designs/:id': EDIT(200),
  'DELETE /api/designs/:id': EDIT(204),

  // Uploaded tables.
  'GET /api/projects/:id/tables': READ(),
  'POST /api/projects/:id/tables': EDIT(201),
  'GET /api/tables/:id': READ(),

  // Runs (a finished single run per team) and sweeps (a queued sweep per team).
  'GET /api/runs': READ(),
  'POST /api/runs': EDIT(201),
  'GET /api/runs/:id': READ(),
  'PATCH /api/runs/:id': EDIT(200), // rename
  'POST /api/runs/:id/cancel': EDIT(200),
  'GET /api/runs/:id/cells/:index': READ(),
  'GET /api/runs/:id/cells/:index/export': READ(),
  'GET /api/runs/:id/cells/:index/surface': READ(),
  'GET /api/runs/:id/events': READ(),
  'GET /api/sweeps': READ(),
  'POST /api/sweeps': EDIT(201),
  'GET /api/sweeps/:id': READ(),
  'PATCH /api/sweeps/:id': EDIT(200), // rename
  'POST /api/sweeps/:id/cancel': EDIT(200),
  'GET /api/sweeps/:id/cells/:index': READ(),
  'GET /api/sweeps/:id/events': READ(),

  // Shortlist.
  'GET /api/projects/:id/shortlist': READ(),
  'POST /api/projects/:id/shortlist': MEMBER(201),
  'GET /api/shortlist/:id': READ(),
  'PATCH /api/shortlist/:id': AUTHOR_OR_LEAD(200),
  'DELETE /api/shortlist/:id': AUTHOR_OR_LEAD(200),
  'POST /api/shortlist/:id/comments': MEMBER(201),
  'POST /api/shortlist/:id/choose': LEAD(200),
  'POST /api/shortlist/:id/unchoose': LEAD(200),

  // Teams and invitations.
  'GET /api/teams/:id/members': READ(),
  'GET /api/teams/:id/invitations': LEAD(200),
  // Target: a fresh viewer of team A / of team B. Only a lead changes roles or removes members.
  'PATCH /api/teams/:id/members/:userId': LEAD(200),
  'DELETE /api/teams/:id/members/:userId': LEAD(200),
  'POST /api/teams/:id/invitations': LEAD(201),
  'DELETE /api/invitations/:id': LEAD(200),
}

// ---------------------------------------------------------------------------------------------------------------
// The route list, from the files.
const apiDir = join(repoRoot, 'server', 'api')

function routeOf(file: string): string {
  const m = /^(.*)\.(get|post|put|patch|delete)\.ts$/.exec(file.split('\\').join('/'))
  if (!m) throw new Error(`server/api/${file}: the file name carries no method (.get/.post/.put/.patch/.delete)`)
  const segments = m[1]!.split('/').map((s) => s.replace(/^\[(\w+)\]$/, ':$1'))
  if (segments.at(-1) === 'index') segments.pop()
  return `${m[2]!.toUpperCase()} /api${segments.length ? '/' + segments.join('/') : ''}`
}

const ROUTES = (readdirSync(apiDir, { recursive: true }) as string[]).filter((f) => f.endsWith('.ts')).map(routeOf).sort()

// ---------------------------------------------------------------------------------------------------------------
// Fixtures.
const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
const scenario = { ...validScenario, trace: { ...validScenario.trace, rays: 20_000, seed: 3 } }
const SMALL = { precision: { rays: 20_000 } }
const UNKNOWN_LINK = 'aZ9_unknown-link-token-0123456789abcdefghij'

interface Account { client: ApiClient; email: string; password: string; userId: string }
interface Team {
  id: string
  projectId: string
  designId: string
  /** A finished single run (one cell, traced). */
  runId: string
  /** A queued sweep of two cells. */
  sweepId: string
  tableId: string
  /** A shortlist entry on the finished run's cell, written by `author`. */
  entryId: string
  lead: Account
  author: Account
}
let A: Team
let B: Team
const accounts = {} as Record<'lead' | 'designer' | 'viewer' | 'outsider', Account>
let apiToken = ''
let seq = 0
const unique = (tag: string) => `${tag} ${Date.now().toString(36)}-${++seq}`

function expectStatus(res: { status: number; body: unknown }, status: number, what: string) {
  if (res.status !== status) throw new Error(`fixture ${what}: ${res.status} ${JSON.stringify(res.body)}`)
}

async function account(tag: string): Promise<Account & { teamId: string }> {
  const a = await signedUpClient(tag)
  return { client: a.client, email: a.email, password: a.password, userId: a.userId, teamId: a.teamId }
}

async function freshDesign(t: Team) {
  const r = await t.lead.client.post(`/api/projects/${t.projectId}/designs`, { name: unique('Caps'), scenario })
  expectStatus(r, 201, 'design')
  return r.body.design.id as string
}

async function freshRun(t: Team, kind: 'single' | 'sweep' = 'single') {
  const r = kind === 'single'
    ? await t.lead.client.post('/api/runs', { designId: t.designId, ...SMALL })
    : await t.lead.client.post('/api/sweeps', { designId: t.designId, ...SMALL, axes: [{ parameter: 'lensArray.sagUm', values: [3, 5] }] })
  expectStatus(r, 201, `${kind} run`)
  return (kind === 'single' ? r.body.run.id : r.body.sweep.id) as string
}

async function freshEntry(t: Team, chosen = false) {
  const runId = await freshRun(t)
  const r = await t.author.client.post(`/api/projects/${t.projectId}/shortlist`, { runId, cellIndex: 0, note: 'fixture' })
  expectStatus(r, 201, 'shortlist entry')
  if (chosen) expectStatus(await t.lead.client.post(`/api/shortlist/${r.body.entry.id}/choose`, { reason: 'fixture choice', replaceChosen: true }), 200, 'choose')
  return r.body.entry.id as string
}

async function freshInvitation(t: Team) {
  const r = await t.lead.client.post(`/api/teams/${t.id}/invitations`, { email: uniqueEmail('invitee'), role: 'viewer' })
  expectStatus(r, 201, 'invitation')
  return r.body.invitation.id as string
}

/** A new account joined to the team as viewer (by a membership row, like A's designer and viewer). */
async function freshMember(t: Team) {
  const m = await account('authz-member')
  await pool.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'viewer')`, [t.id, m.userId])
  return m.userId
}

/** Team A: a token of A's designer; team B: a token of B's lead (each team's "own" token holder). */
async function freshToken(t: Team) {
  const owner = t === A ? accounts.designer : accounts.outsider
  const r = await owner.client.post('/api/account/tokens', { name: unique('cell') })
  expectStatus(r, 201, 'token')
  return r.body.id as string
}

async function uploadTable(t: Team) {
  const r = await rawFetch('POST', `/api/projects/${t.projectId}/tables?${tableQuery()}`, {
    'content-type': 'text/csv', origin: baseUrl, cookie: t.lead.client.cookie,
  }, LENS_CSV)
  expectStatus(r, 201, 'table')
  return r.body.table.id as string
}

const LENS_CSV = 'r_um,height_um\n0,2\n1,1.5\n2,0\n'
const tableQuery = () => `kind=lens_profile&name=${encodeURIComponent(unique('profile'))}&fileName=profile.csv`

async function makeTeam(lead: Account & { teamId: string }, author: Account, tag: string): Promise<Team> {
  const p = await lead.client.post('/api/projects', { teamId: lead.teamId, name: `Authz ${tag}` })
  expectStatus(p, 201, 'project')
  const t = { id: lead.teamId, projectId: p.body.project.id, lead, author } as Team
  t.designId = await freshDesign(t)
  t.tableId = await uploadTable(t)
  t.sweepId = await freshRun(t, 'sweep')
  return t
}

// ---------------------------------------------------------------------------------------------------------------
// Requests. Each cell builds its request (making what it needs first), sends it as the actor and keeps the status.
interface Spec {
  method: string
  path: string
  json?: unknown
  csv?: string
  /** A Server-Sent Events stream: read the status, then abort. */
  sse?: boolean
  headers?: Record<string, string>
  /** A session cookie to send instead of the actor's own (sign-out works on a session made for the cell). */
  cookie?: string
}
type Build = (t: Team, actor: ActorName) => Spec | Promise<Spec>

const get = (path: string): Spec => ({ method: 'GET', path })
const post = (path: string, json: unknown = {}): Spec => ({ method: 'POST', path, json })

const REQUESTS: Record<string, Build> = {
  'GET /api/account/tokens': () => get('/api/account/tokens'),
  'POST /api/account/tokens': () => post('/api/account/tokens', { name: unique('script') }),
  'DELETE /api/account/tokens/:id': async (t) => ({ method: 'DELETE', path: `/api/account/tokens/${await freshToken(t)}` }),

  'GET /api/health': () => get('/api/health'),
  'GET /api/auth/me': () => get('/api/auth/me'),
  'POST /api/auth/sign-in': () => ({
    // An unknown e-mail and an address of its own per cell, so these failures never reach either throttle.
    ...post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: 'not-the-password-at-all' }),
    headers: { 'x-forwarded-for': `198.51.100.${(seq++ % 250) + 1}` },
  }),
  'POST /api/auth/sign-up': () => post('/api/auth/sign-up', { email: uniqueEmail('authz-signup'), name: 'Matrix cell', password: 'pw-matrix-correct-horse' }),
  'POST /api/auth/sign-out': async (_t, actor) => {
    if (actor === 'anon' || actor === 'token') return post('/api/auth/sign-out')
    return { ...post('/api/auth/sign-out'), cookie: await newSession(accounts[actor]) }
  },
  'POST /api/auth/password-reset/request': () => post('/api/auth/password-reset/request', { email: uniqueEmail('nobody') }),
  'POST /api/auth/password-reset/confirm': () => post('/api/auth/password-reset/confirm', { token: UNKNOWN_LINK, password: 'pw-matrix-correct-horse' }),
  'GET /api/invitations/preview': () => get(`/api/invitations/preview?token=${UNKNOWN_LINK}`),
  'POST /api/invitations/accept': () => post('/api/invitations/accept', { token: UNKNOWN_LINK }),
  'GET /api/demo/accounts': () => get('/api/demo/accounts'),
  'GET /api/dev/mailbox': () => get('/api/dev/mailbox?limit=1'),

  'GET /api/projects': () => get('/api/projects'),
  'POST /api/projects': (t) => post('/api/projects', { teamId: t.id, name: unique('Project') }),
  'GET /api/projects/:id': (t) => get(`/api/projects/${t.projectId}`),
  'PATCH /api/projects/:id': (t) => ({ method: 'PATCH', path: `/api/projects/${t.projectId}`, json: { limits: { maxSagUm: 8 } } }),
  'GET /api/projects/:id/designs': (t) => get(`/api/projects/${t.projectId}/designs`),
  'POST /api/projects/:id/designs': (t) => post(`/api/projects/${t.projectId}/designs`, { name: unique('Design'), scenario }),
  'GET /api/designs/:id': (t) => get(`/api/designs/${t.designId}`),
  'PATCH /api/designs/:id': (t) => ({ method: 'PATCH', path: `/api/designs/${t.designId}`, json: { name: unique('Renamed') } }),
  'DELETE /api/designs/:id': async (t) => ({ method: 'DELETE', path: `/api/designs/${await freshDesign(t)}` }),

  'GET /api/projects/:id/tables': (t) => get(`/api/projects/${t.projectId}/tables`),
  'POST /api/projects/:id/tables': (t) => ({ method: 'POST', path: `/api/projects/${t.projectId}/tables?${tableQuery()}`, csv: LENS_CSV }),
  'GET /api/tables/:id': (t) => get(`/api/tables/${t.tableId}`),

  'GET /api/runs': (t) => get(`/api/runs?projectId=${t.projectId}`),
  'POST /api/runs': (t) => post('/api/runs', { designId: t.designId, ...SMALL }),
  'GET /api/runs/:id': (t) => get(`/api/runs/${t.runId}`),
  'PATCH /api/runs/:id': (t) => ({ method: 'PATCH', path: `/api/runs/${t.runId}`, json: { name: unique('Run') } }),
  'POST /api/runs/:id/cancel': async (t) => post(`/api/runs/${await freshRun(t)}/cancel`),
  'GET /api/runs/:id/cells/:index': (t) => get(`/api/runs/${t.runId}/cells/0`),
  'GET /api/runs/:id/cells/:index/export': (t) => get(`/api/runs/${t.runId}/cells/0/export?format=json`),
  'GET /api/runs/:id/cells/:index/surface': (t) => get(`/api/runs/${t.runId}/cells/0/surface?format=sag&points=11`),
  'GET /api/runs/:id/events': (t) => ({ ...get(`/api/runs/${t.runId}/events`), sse: true }),
  'GET /api/sweeps': (t) => get(`/api/sweeps?projectId=${t.projectId}`),
  'POST /api/sweeps': (t) => post('/api/sweeps', { designId: t.designId, ...SMALL, axes: [{ parameter: 'lensArray.sagUm', values: [3, 5] }] }),
  'GET /api/sweeps/:id': (t) => get(`/api/sweeps/${t.sweepId}`),
  'PATCH /api/sweeps/:id': (t) => ({ method: 'PATCH', path: `/api/sweeps/${t.sweepId}`, json: { name: unique('Sweep') } }),
  'POST /api/sweeps/:id/cancel': async (t) => post(`/api/sweeps/${await freshRun(t, 'sweep')}/cancel`),
  'GET /api/sweeps/:id/cells/:index': (t) => get(`/api/sweeps/${t.sweepId}/cells/1`),
  'GET /api/sweeps/:id/events': (t) => ({ ...get(`/api/sweeps/${t.sweepId}/events`), sse: true }),

  'GET /api/projects/:id/shortlist': (t) => get(`/api/projects/${t.projectId}/shortlist`),
  'POST /api/projects/:id/shortlist': async (t) => post(`/api/projects/${t.projectId}/shortlist`, { runId: await freshRun(t), cellIndex: 0, note: 'cell' }),
  'GET /api/shortlist/:id': (t) => get(`/api/shortlist/${t.entryId}`),
  'PATCH /api/shortlist/:id': (t) => ({ method: 'PATCH', path: `/api/shortlist/${t.entryId}`, json: { note: unique('note') } }),
  'DELETE /api/shortlist/:id': async (t) => ({ method: 'DELETE', path: `/api/shortlist/${await freshEntry(t)}` }),
  'POST /api/shortlist/:id/comments': (t) => post(`/api/shortlist/${t.entryId}/comments`, { body: 'Looks good' }),
  // Other cells leave a chosen entry behind, so the move is confirmed (replaceChosen) to test the role alone.
  'POST /api/shortlist/:id/choose': async (t) => post(`/api/shortlist/${await freshEntry(t)}/choose`, { reason: 'Best enhancement', replaceChosen: true }),
  'POST /api/shortlist/:id/unchoose': async (t) => post(`/api/shortlist/${await freshEntry(t, true)}/unchoose`),

  'GET /api/teams/:id/members': (t) => get(`/api/teams/${t.id}/members`),
  'GET /api/teams/:id/invitations': (t) => get(`/api/teams/${t.id}/invitations`),
  'PATCH /api/teams/:id/members/:userId': async (t) => ({ method: 'PATCH', path: `/api/teams/${t.id}/members/${await freshMember(t)}`, json: { role: 'designer' } }),
  'DELETE /api/teams/:id/members/:userId': async (t) => ({ method: 'DELETE', path: `/api/teams/${t.id}/members/${await freshMember(t)}` }),
  'POST /api/teams/:id/invitations': (t) => post(`/api/teams/${t.id}/invitations`, { email: uniqueEmail('invitee'), role: 'designer' }),
  'DELETE /api/invitations/:id': async (t) => ({ method: 'DELETE', path: `/api/invitations/${await freshInvitation(t)}` }),
}

async function rawFetch(method: string, path: string, headers: Record<string, string>, body?: string) {
  const res = await fetch(baseUrl + path, { method, headers, body, redirect: 'manual' })
  const text = await res.text()
  let parsed: any = text
  try { parsed = text ? JSON.parse(text) : null } catch { /* not JSON */ }
  return { status: res.status, body: parsed }
}

/** A second session of the account (a fresh client: signing in ends only the session a client carries). */
async function newSession(a: Account) {
  const c = new ApiClient()
  expectStatus(await c.post('/api/auth/sign-in', { email: a.email, password: a.password }), 200, 'sign-in')
  return c.cookie
}

/** Sends the cell's request as the actor, without keeping any cookie it sets; the answer's status. */
async function send(actor: ActorName, spec: Spec): Promise<number> {
  const headers: Record<string, string> = { accept: spec.sse ? 'text/event-stream' : 'application/json', ...spec.headers }
  if (actor === 'token') headers.authorization = `Bearer ${apiToken}`
  else headers.origin = baseUrl
  const cookie = spec.cookie ?? (actor === 'token' || actor === 'anon' ? '' : accounts[actor].client.cookie)
  if (cookie) headers.cookie = cookie
  let body: string | undefined
  if (spec.json !== undefined) { headers['content-type'] = 'application/json'; body = JSON.stringify(spec.json) }
  if (spec.csv !== undefined) { headers['content-type'] = 'text/csv'; body = spec.csv }
  const abort = new AbortController()
  const timer = setTimeout(() => abort.abort(), 15_000)
  try {
    const res = await fetch(baseUrl + spec.path, { method: spec.method, headers, body, redirect: 'manual', signal: abort.signal })
    if (spec.sse && res.ok) {
      expect(res.headers.get('content-type')).toMatch(/text\/event-stream/)
      abort.abort()
    } else {
      await res.arrayBuffer()
    }
    return res.status
  } finally {
    clearTimeout(timer)
  }
}

// ---------------------------------------------------------------------------------------------------------------
beforeAll(async () => {
  const leadA = await account('authz-lead-a')
  const designer = await account('authz-designer-a')
  const viewer = await account('authz-viewer-a')
  const leadB = await account('authz-lead-b')
  // Team A's designer and viewer join by membership rows (the invitation flow has its own tests).
  await pool.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'designer'), ($1, $3, 'viewer')`, [leadA.teamId, designer.userId, viewer.userId])
  Object.assign(accounts, { lead: leadA, designer, viewer, outsider: leadB })
  const made = await designer.client.post('/api/account/tokens', { name: 'authz matrix' })
  expectStatus(made, 201, 'api token')
  apiToken = made.body.token

  A = await makeTeam(leadA, designer, 'A')
  B = await makeTeam(leadB, leadB, 'B')
  // One traced run per team, for the routes that need a finished cell (exports, surface, shortlist entries).
  const worker = startWorkerProcess(1)
  try {
    await worker.ready
    A.runId = await freshRun(A)
    B.runId = await freshRun(B)
    for (const t of [A, B]) {
      const run = await waitForRunEnd(pool, t.runId)
      expect(run.status).toBe('done')
    }
  } finally {
    await worker.kill('SIGTERM')
  }
  for (const t of [A, B]) {
    const r = await t.author.client.post(`/api/projects/${t.projectId}/shortlist`, { runId: t.runId, cellIndex: 0, note: 'fixture' })
    expectStatus(r, 201, 'shortlist entry')
    t.entryId = r.body.entry.id
  }
})

afterAll(async () => {
  // Runs this file left queued would be traced by the workers of later test files: cancel them.
  for (const t of [A, B]) {
    if (!t) continue
    const { rows } = await pool.query(`SELECT id FROM runs WHERE project_id = $1 AND status IN ('queued', 'running')`, [t.projectId])
    for (const r of rows) await t.lead.client.post(`/api/runs/${r.id}/cancel`)
  }
  await pool.end()
})

describe('authorization matrix', () => {
  it('has a written expectation and a request for every route under server/api, and none for a route that is gone', () => {
    expect(ROUTES.length).toBeGreaterThan(40)
    expect(Object.keys(MATRIX).sort()).toEqual(ROUTES)
    expect(Object.keys(REQUESTS).sort()).toEqual(ROUTES)
  })

  for (const route of ROUTES) {
    it(route, async () => {
      const row = MATRIX[route]
      const build = REQUESTS[route]
      if (!row || !build) throw new Error(`${route} has no row in MATRIX or no request in REQUESTS: write down who may call it`)
      const expected: Record<string, Cell> = {}
      const actual: Record<string, Cell> = {}
      for (const actor of ACTORS) {
        const cell = row[actor]
        const targets: TargetName[] = typeof cell === 'number' ? ['own'] : ['own', 'other']
        const got: number[] = []
        for (const target of targets) got.push(await send(actor, await build(target === 'own' ? A : B, actor)))
        expected[actor] = cell
        actual[actor] = typeof cell === 'number' ? got[0]! : [got[0]!, got[1]!]
      }
      expect(actual).toEqual(expected)
    })
  }

  it('the project list and the members list show nothing of the other team', async () => {
    const ids = (await accounts.lead.client.get('/api/projects')).body.projects.map((p: { id: string }) => p.id)
    expect(ids).toContain(A.projectId)
    expect(ids).not.toContain(B.projectId)
    const byToken = await rawFetch('GET', '/api/projects', { authorization: `Bearer ${apiToken}` })
    expect(byToken.body.projects.map((p: { id: string }) => p.id)).not.toContain(B.projectId)
    const members = (await accounts.viewer.client.get(`/api/teams/${A.id}/members`)).body.members.map((m: { email: string }) => m.email)
    // Members the team-route cells joined to team A (authz-member.*) are A's own; none of team B shows.
    expect(members.filter((e: string) => !e.startsWith('authz-member.')).sort()).toEqual([accounts.lead.email, accounts.designer.email, accounts.viewer.email].sort())
    expect(members).not.toContain(accounts.outsider.email)
    const runs = (await accounts.lead.client.get(`/api/runs?projectId=${A.projectId}`)).body.runs.map((r: { id: string }) => r.id)
    expect(runs).toContain(A.runId)
    expect(runs).not.toContain(B.runId)
  })

  it('an own id does not carry another team\'s id through: B\'s run cannot be bookmarked into A\'s project', async () => {
    for (const actor of ['lead', 'designer', 'token'] as const) {
      expect(await send(actor, post(`/api/projects/${A.projectId}/shortlist`, { runId: B.runId, cellIndex: 0, note: 'borrowed' })), actor).toBe(404)
    }
    const { rows: [n] } = await pool.query('SELECT count(*)::int AS n FROM shortlist_entries WHERE run_id = $1', [B.runId])
    expect(n.n).toBe(1) // B's own fixture entry only
  })
})
