// npm run load: the built server under read load while sweeps run. On a throwaway PostgreSQL with the demo data, the
// production server (with its embedded worker) first traces 5 sweeps alone; then the same 5 sweeps again while 50
// signed-in clients (autocannon, 50 connections, each with its own session) read project, run and result pages.
// Prints p50/p95/p99 latency, request count, errors and non-2xx answers, and the sweeps' slowdown under load.
// Bounded: the read load stops when the sweeps are done or after --max-seconds (default 120). Loopback only.
import { spawn } from 'node:child_process'
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { parseArgs } from 'node:util'
import autocannon from 'autocannon'
import pg from 'pg'
import { createDatabase, ensurePostgres, freePort, migrateDatabase, repoRoot, stopOnExit } from '../scripts/postgres'
import { buildApp, waitForHttp } from '../scripts/run'

const { values } = parseArgs({ options: {
  'max-seconds': { type: 'string' }, clients: { type: 'string' }, 'rays-per-cell': { type: 'string' },
}, strict: false })
const maxSeconds = Number(values['max-seconds'] ?? 120)
const clients = Number(values.clients ?? 50)
const raysPerCell = Number(values['rays-per-cell'] ?? 100_000)

if (!existsSync(join(repoRoot, '.output', 'server', 'index.mjs'))) buildApp()
const pgServer = await ensurePostgres({ database: 'postgres', throwaway: true })
let app: ReturnType<typeof spawn> | null = null
stopOnExit(() => { app?.kill('SIGKILL'); pgServer.stop() })
const url = await createDatabase(pgServer.adminUrl, `lensfield_load_${Date.now().toString(36)}`)
await migrateDatabase(url)
process.env.DATABASE_URL = url
const { dbFromPool } = await import('../server/utils/db')
const { DEMO_USERS, loadDemoData } = await import('../server/utils/demo')
const pool = new pg.Pool({ connectionString: url, max: 2 })
const { projectId } = await loadDemoData(dbFromPool(pool))

const port = await freePort()
const base = `http://127.0.0.1:${port}`
app = spawn(process.execPath, [join(repoRoot, '.output', 'server', 'index.mjs')], {
  env: { ...process.env, DATABASE_URL: url, HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production' },
  stdio: ['ignore', 'ignore', 'inherit'],
})
await waitForHttp(`${base}/api/health`, 60_000)

async function signIn(email: string, password: string): Promise<string> {
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email, password }),
  })
  if (res.status !== 200) throw new Error(`sign-in failed: ${res.status}`)
  // The last session cookie wins (a sign-in first clears any carried session, then sets the new one).
  return res.headers.getSetCookie().map((c) => c.split(';')[0]!).filter((c) => c.startsWith('lensfield_session=')).at(-1)!
}
const designer = DEMO_USERS.find((u) => u.role === 'designer')!
const cookies: string[] = []
for (let i = 0; i < clients; i++) {
  const u = DEMO_USERS[i % DEMO_USERS.length]!
  cookies.push(await signIn(u.email, u.password))
}
const designerCookie = await signIn(designer.email, designer.password)
const api = async (method: string, path: string, body?: unknown) => {
  const res = await fetch(base + path, {
    method, headers: { 'content-type': 'application/json', origin: base, cookie: designerCookie }, body: body ? JSON.stringify(body) : undefined,
  })
  const json = await res.json()
  if (res.status >= 400) throw new Error(`${method} ${path}: ${res.status} ${json.message}`)
  return json
}
const designs = (await api('GET', `/api/projects/${projectId}/designs`)).designs as Array<{ id: string; scenario: { lensArray: unknown } }>
const lens = designs.find((d) => d.scenario.lensArray)!

async function sweeps(n: number): Promise<number> {
  const t0 = performance.now()
  const ids: string[] = []
  for (let i = 0; i < n; i++) {
    const r = await api('POST', '/api/sweeps', {
      designId: lens.id, axes: [{ parameter: 'lensArray.sagUm', values: [1.5, 2.5, 3.5] }, { parameter: 'lensArray.fillFactor', values: [0.5, 0.7, 0.9] }],
      seed: 100 + i, precision: { rays: raysPerCell },
    })
    ids.push(r.sweep.id)
  }
  for (;;) {
    const { rows } = await pool.query(`SELECT count(*)::int AS open FROM runs WHERE id = ANY($1) AND status IN ('queued', 'running')`, [ids])
    if (rows[0].open === 0) break
    if ((performance.now() - t0) / 1000 > maxSeconds * 3) throw new Error('sweeps did not finish in time')
    await new Promise((r) => setTimeout(r, 200))
  }
  return (performance.now() - t0) / 1000
}

// Something finished to read: one small run.
const done = await api('POST', '/api/runs', { designId: lens.id, precision: { rays: 20_000 } })
for (;;) {
  const r = await api('GET', `/api/runs/${done.run.id}`)
  if (r.run.status === 'done') break
  await new Promise((res) => setTimeout(res, 200))
}

console.log(`load: ${clients} signed-in clients reading while 5 sweeps (3 × 3 cells, ${raysPerCell.toLocaleString('en-US')} rays per cell) run on the embedded worker`)
const quiet = await sweeps(5)
console.log(`  5 sweeps alone:         ${quiet.toFixed(1)} s`)

const paths = [
  `/api/projects/${projectId}`, `/api/projects/${projectId}/designs`, `/api/runs?projectId=${projectId}`,
  `/api/runs/${done.run.id}`, `/api/runs/${done.run.id}/cells/0`, `/projects/${projectId}`,
]
// Every path must answer 200 for a signed-in reader before it is worth loading; its quiet latency is printed.
for (const path of paths) {
  const times: number[] = []
  let bytes = 0
  for (let i = 0; i < 10; i++) {
    const t0 = performance.now()
    const res = await fetch(base + path, { headers: { cookie: cookies[0]!, accept: 'application/json' } })
    bytes = (await res.arrayBuffer()).byteLength
    times.push(performance.now() - t0)
    if (res.status !== 200) throw new Error(`GET ${path} answered ${res.status} before the load started`)
  }
  times.sort((a, b) => a - b)
  console.log(`  quiet: GET ${path.replace(/[0-9a-f-]{36}/g, ':id').padEnd(34)} median ${times[5]!.toFixed(1).padStart(6)} ms, ${(bytes / 1024).toFixed(1)} KiB`)
}
let client = 0
const sweepDone = sweeps(5)
const cannon = autocannon({
  url: base,
  connections: clients,
  duration: maxSeconds,
  // Each connection is one client with its own session: the first request it makes picks its cookie.
  requests: paths.map((path) => ({
    method: 'GET' as const,
    path,
    setupRequest: (req: { headers?: Record<string, string> }, context: { cookie?: string }) => {
      context.cookie ??= cookies[client++ % cookies.length]
      return { ...req, headers: { ...(req.headers ?? {}), cookie: context.cookie, accept: 'application/json' } }
    },
  })),
})
const loaded = await sweepDone
;(cannon as unknown as { stop: () => void }).stop()
const result = await cannon
const l = result.latency
console.log(`  5 sweeps under load:    ${loaded.toFixed(1)} s (slowdown ×${(loaded / quiet).toFixed(2)})`)
console.log(`  reads: ${result.requests.total} requests in ${result.duration.toFixed(0)} s, ${Math.round(result.requests.average)} req/s; ` +
  `latency p50 ${l.p50} ms, p97.5 ${(l as unknown as { p97_5: number }).p97_5} ms (p95 lies below it), p99 ${l.p99} ms, max ${l.max} ms`)
console.log(`  errors ${result.errors}, timeouts ${result.timeouts}, non-2xx ${result.non2xx}`)

app.kill('SIGTERM')
await pool.end()
process.exit(result.errors + result.non2xx === 0 ? 0 : 1)
