// Faults during long sweeps: workers killed without warning again and again, and the database itself going away
// and coming back. Nothing may be lost or counted twice, and the web server keeps answering meanwhile (503 on
// data routes while the database is down). Needs the cluster `npm test` started (LENSFIELD_PG_DATA_DIR/BIN_DIR).
import pg from 'pg'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { traceScenario } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { startServer, stopServer } from '../../scripts/postgres'
import { ApiClient } from './client'
import { killMidBatch, startWorkerProcess, teamWithDesign, waitFor, waitForRunEnd, type WorkerProcess } from './jobs'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
pool.on('error', () => { /* idle clients die when the server is stopped on purpose */ })
const workers: WorkerProcess[] = []
afterAll(async () => {
  for (const w of workers) await w.kill('SIGKILL')
  await pool.end()
})
function worker() {
  const w = startWorkerProcess(1)
  workers.push(w)
  return w
}

/** Every cell done, counted once: its counts equal the engine run directly with the cell's seed. */
async function expectExactlyOnce(runId: string, raysPerCell: number) {
  const { rows: cells } = await pool.query(
    `SELECT status, rays_done, rays_planned, summary, seed, scenario FROM run_cells WHERE run_id = $1 ORDER BY cell_index`, [runId])
  for (const c of cells) {
    expect(c.status).toBe('done')
    expect(Number(c.rays_done)).toBe(raysPerCell)
    const direct = traceScenario(scenarioSchema.parse(c.scenario), { rays: raysPerCell, seed: Number(c.seed) })
    expect(c.summary.extraction).toBe(direct.extraction)
    expect(c.summary.losses).toEqual(direct.losses)
  }
  const { rows: [b] } = await pool.query(
    `SELECT count(*)::int AS n, count(*) FILTER (WHERE b.status = 'done')::int AS done
     FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1`, [runId])
  expect(b.done).toBe(b.n)
}

const dataDir = process.env.LENSFIELD_PG_DATA_DIR
const binDir = process.env.LENSFIELD_PG_BIN_DIR

describe('faults mid-sweep', () => {
  it('a worker SIGKILLed 10 times in a row: the sweep still ends with every cell exactly once', async () => {
    const t = await teamWithDesign('killed10')
    const created = await t.client.post('/api/sweeps', {
      designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', values: [1, 2, 3, 4] }], seed: 5, precision: { rays: 400_000 },
    })
    expect(created.status).toBe(201)
    const id = created.body.sweep.id as string
    const victims: Array<{ cell_id: string; batch_index: number }> = []
    for (let i = 0; i < 10; i++) {
      const w = worker()
      await w.ready
      victims.push(await killMidBatch(pool, w, id))
    }
    const last = worker()
    await last.ready
    const run = await waitForRunEnd(pool, id, 180_000)
    expect(run.status).toBe('done')
    await expectExactlyOnce(id, 400_000)
    // Each killed batch was taken again after its expiry and counted once.
    for (const v of victims) {
      const { rows: [b] } = await pool.query(`SELECT status, attempts FROM run_batches WHERE cell_id = $1 AND batch_index = $2`, [v.cell_id, v.batch_index])
      expect(b.status).toBe('done')
      expect(b.attempts).toBeGreaterThanOrEqual(2)
    }
    await last.kill()
  })

  it.skipIf(!dataDir || !binDir)('PostgreSQL stopped and restarted mid-sweep: the site answers 503 on data routes, then the sweep completes', async () => {
    const t = await teamWithDesign('dbdown')
    const created = await t.client.post('/api/sweeps', {
      designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', values: [2, 3.5, 5] }], seed: 8, precision: { rays: 400_000 },
    })
    expect(created.status).toBe(201)
    const id = created.body.sweep.id as string
    const w = worker()
    await w.ready
    await waitFor('three batches done', async () => {
      const { rows: [r] } = await pool.query(
        `SELECT count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1 AND b.status = 'done'`, [id])
      return r.n >= 3
    })
    const minted = await t.client.post('/api/account/tokens', { name: 'outage probe' })
    expect(minted.status).toBe(201)
    const port = Number(new URL(inject('databaseUrl')).port)
    stopServer(binDir!, dataDir!)
    try {
      // The web server is up; data routes say the database is away, with a clear message.
      const health = await new ApiClient().get('/api/health')
      expect(health.status).toBe(200)
      expect(health.body.database).toBe('down')
      const projects = await t.client.get('/api/projects')
      expect(projects.status).toBe(503)
      expect(projects.body.message).toMatch(/database is not answering/)
      const sweep = await t.client.get(`/api/sweeps/${id}`)
      expect(sweep.status).toBe(503)
      // Every route maps a lost database the same way (server/utils/api-errors.ts), not only the cookie path:
      // a bearer-token request, a sign-in and the mailbox.
      const byToken = await fetch(`${inject('baseUrl')}/api/projects`, { headers: { authorization: `Bearer ${minted.body.token}` } })
      expect(byToken.status).toBe(503)
      expect((await byToken.json()).message).toMatch(/database is not answering/)
      const signIn = await new ApiClient().post('/api/auth/sign-in', { email: t.email, password: t.password })
      expect(signIn.status).toBe(503)
      expect(signIn.body.message).toMatch(/database is not answering/)
      expect((await t.client.get('/api/dev/mailbox')).status).toBe(503)
      await new Promise((r) => setTimeout(r, 3000))
    } finally {
      startServer(binDir!, dataDir!, port, true)
    }
    const run = await waitForRunEnd(pool, id, 180_000)
    expect(run.status).toBe('done')
    await expectExactlyOnce(id, 400_000)
    // And the site serves data again.
    expect((await t.client.get(`/api/sweeps/${id}`)).status).toBe(200)
    await w.kill()
  })
})
