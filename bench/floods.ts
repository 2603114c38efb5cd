// npm run floods: /api/health and a data read while the server is flooded, on a throwaway PostgreSQL with the demo
// data and the production server (no embedded worker, so a queued run's streams stay open):
//   1. quiet: 200 health requests one after the other;
//   2. 1 000 progress streams (SSE) on one session, and 5 000 slow sockets (headers sent, body never) from 25
//      loopback addresses (200 each) plus 1 000 more from one address: 200 health requests and 50 run reads meanwhile;
//   3. how many slow sockets the server has closed after its request timeout (30 s + checking interval).
// Prints latencies (p50/p99/max) and counts. Loopback only; bounded (about 45 s).
import { spawn } from 'node:child_process'
import { existsSync } from 'node:fs'
import http from 'node:http'
import net from 'node:net'
import { join } from 'node:path'
import pg from 'pg'
import { createDatabase, ensurePostgres, freePort, migrateDatabase, repoRoot, stopOnExit } from '../scripts/postgres'
import { buildApp, waitForHttp } from '../scripts/run'

if (!existsSync(join(repoRoot, '.output', 'server', 'index.mjs'))) buildApp()
const pgServer = await ensurePostgres({ database: 'postgres', throwaway: true })
let app: ReturnType<typeof spawn> | null = null
const sockets: net.Socket[] = []
const requests: http.ClientRequest[] = []
stopOnExit(() => { app?.kill('SIGKILL'); pgServer.stop() })
const url = await createDatabase(pgServer.adminUrl, `lensfield_floods_${Date.now().toString(36)}`)
await migrateDatabase(url)
process.env.DATABASE_URL = url
const { dbFromPool } = await import('../server/utils/db')
const { DEMO_USERS, loadDemoData } = await import('../server/utils/demo')
const pool = new pg.Pool({ connectionString: url, max: 2 })
const { projectId } = await loadDemoData(dbFromPool(pool))
await pool.end()

const port = await freePort()
const base = `http://127.0.0.1:${port}`
app = spawn(process.execPath, [join(repoRoot, '.output', 'server', 'index.mjs')], {
  env: { ...process.env, DATABASE_URL: url, HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production', LENSFIELD_EMBEDDED_WORKER: '0' },
  stdio: ['ignore', 'ignore', 'inherit'],
})
await waitForHttp(`${base}/api/health`, 60_000)

const designer = DEMO_USERS.find((u) => u.role === 'designer')!
const signIn = await fetch(`${base}/api/auth/sign-in`, {
  method: 'POST', headers: { 'content-type': 'application/json', origin: base }, body: JSON.stringify({ email: designer.email, password: designer.password }),
})
const cookie = signIn.headers.getSetCookie().map((c) => c.split(';')[0]!).filter((c) => c.startsWith('lensfield_session=')).at(-1)!
const api = async (method: string, path: string, body?: unknown) => {
  const res = await fetch(base + path, { method, headers: { 'content-type': 'application/json', origin: base, cookie }, body: body ? JSON.stringify(body) : undefined })
  // Only the fields read below (designs, run) and the error message.
  const json = await res.json() as { message?: string, designs?: Array<{ id: string }>, run?: { id: string } }
  if (res.status >= 400) throw new Error(`${method} ${path}: ${res.status} ${json.message}`)
  return json
}
const designs = (await api('GET', `/api/projects/${projectId}/designs`)).designs ?? []
const runId = (await api('POST', '/api/runs', { designId: designs[0]!.id, name: 'Flood probe', precision: { rays: 100_000 } })).run!.id

const quantile = (xs: number[], q: number) => [...xs].sort((a, b) => a - b)[Math.min(xs.length - 1, Math.floor(q * xs.length))]!
async function timed(path: string, n: number, headers: Record<string, string> = {}) {
  const ms: number[] = []
  let failed = 0
  for (let i = 0; i < n; i++) {
    const t0 = performance.now()
    const res = await fetch(base + path, { headers }).catch(() => null)
    if (!res || res.status !== 200) failed++
    await res?.arrayBuffer().catch(() => {})
    ms.push(performance.now() - t0)
  }
  return `p50 ${quantile(ms, 0.5).toFixed(1)} ms, p99 ${quantile(ms, 0.99).toFixed(1)} ms, max ${Math.max(...ms).toFixed(1)} ms, ${failed} failed of ${n}`
}

console.log(`quiet: /api/health ${await timed('/api/health', 200)}`)

// 1 000 streams on one session.
const streamStatus = new Map<number, number>()
await Promise.all(Array.from({ length: 1000 }, () => new Promise<void>((resolve) => {
  const req = http.get(`${base}/api/runs/${runId}/events`, { headers: { cookie, accept: 'text/event-stream' } }, (res) => {
    streamStatus.set(res.statusCode!, (streamStatus.get(res.statusCode!) ?? 0) + 1)
    if (res.statusCode !== 200) res.resume()
    resolve()
  })
  req.on('error', () => { streamStatus.set(0, (streamStatus.get(0) ?? 0) + 1); resolve() })
  requests.push(req)
})))
console.log(`1 000 streams on one session: ${[...streamStatus].map(([s, n]) => `${n} × ${s || 'error'}`).join(', ')}`)

// 6 000 slow sockets.
const { hostname } = new URL(base)
let closedByServer = 0
const slow = (localAddress: string) => new Promise<void>((resolve) => {
  const s = net.connect({ host: hostname, port, localAddress })
  // Flowing, so the server's FIN is read and 'close' fires (a paused socket never sees it).
  s.on('error', () => {}).resume()
  s.once('connect', () => {
    s.write(`POST /api/auth/sign-in HTTP/1.1\r\nHost: ${hostname}:${port}\r\nContent-Type: application/json\r\nContent-Length: 1000\r\n\r\n{`)
    resolve()
  })
  s.once('close', () => { closedByServer++ })
  sockets.push(s)
})
const addresses = Array.from({ length: 25 }, (_, i) => `127.0.1.${i + 1}`)
for (const a of addresses) await Promise.all(Array.from({ length: 200 }, () => slow(a)))
await Promise.all(Array.from({ length: 1000 }, () => slow('127.0.2.1')))
await new Promise((r) => setTimeout(r, 1500))
console.log(`6 000 slow sockets (5 000 over 25 addresses, 1 000 from one): ${closedByServer} closed by the server within 1.5 s`)
console.log(`flooded: /api/health ${await timed('/api/health', 200)}`)
console.log(`flooded: GET /api/runs/:id ${await timed(`/api/runs/${runId}`, 50, { cookie })}`)
await new Promise((r) => setTimeout(r, 33_000))
console.log(`35 s after they were opened: ${closedByServer} of the 6 000 slow sockets closed by the server`)
for (const s of sockets) s.destroy()
for (const r of requests) r.destroy()
app.kill('SIGTERM')
pgServer.stop()
process.exit(0)
