// Runs and sweeps through the real queue: the built server takes the requests, real worker processes
// (scripts/worker.ts) trace the batches, Postgres holds everything. The test server runs with its embedded worker
// off, 50 000-ray batches, an 8 s job expiry and 1 s queue maintenance (tests/api/global-setup.ts), so each
// test decides which workers exist.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { traceScenario } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { cellScenario, cellSeed, type SweepAxis } from '../../shared/types/sweep'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_USERS, loadDemoData } from '../../server/utils/demo'
import { ApiClient, signedUpClient } from './client'
import { killMidBatch, startWorkerProcess, teamWithDesign, waitFor, waitForRunEnd as waitEnd, type WorkerProcess } from './jobs'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
const workers: WorkerProcess[] = []
afterAll(async () => {
  for (const w of workers) await w.kill('SIGKILL')
  await pool.end()
})

function worker(threads = 1) {
  const w = startWorkerProcess(threads)
  workers.push(w)
  return w
}

function waitForRunEnd(id: string, timeoutMs = 120_000) {
  return waitEnd(pool, id, timeoutMs)
}

const AXES: SweepAxis[] = [
  { parameter: 'lensArray.sagUm', values: [2, 3] },
  { parameter: 'lensArray.fillFactor', values: [0.6, 0.95] },
]

/** Reads a Server-Sent Events stream until `until` says stop; returns the parsed events. */
async function readEvents(baseUrl: string, path: string, cookie: string, until: (ev: { event: string; data: string }[]) => boolean, timeoutMs = 120_000) {
  const ac = new AbortController()
  const timer = setTimeout(() => ac.abort(), timeoutMs)
  const res = await fetch(baseUrl + path, { headers: { cookie, accept: 'text/event-stream' }, signal: ac.signal })
  const events: { event: string; data: string }[] = []
  if (res.status !== 200) {
    clearTimeout(timer)
    return { status: res.status, events, body: await res.text() }
  }
  const reader = res.body!.getReader()
  let buf = ''
  try {
    while (!until(events)) {
      const { value, done } = await reader.read()
      if (done) break
      buf += new TextDecoder().decode(value)
      let i: number
      while ((i = buf.indexOf('\n\n')) >= 0) {
        const block = buf.slice(0, i)
        buf = buf.slice(i + 2)
        const ev = { event: 'message', data: '' }
        for (const line of block.split('\n')) {
          if (line.startsWith('event:')) ev.event = line.slice(6).trim()
          else if (line.startsWith('data:')) ev.data += line.slice(5).trim()
        }
        events.push(ev)
      }
    }
  } finally {
    clearTimeout(timer)
    ac.abort()
  }
  return { status: res.status, events, body: '' }
}

describe('a sweep through the queue', () => {
  it('completes on a worker process, streams progress, and matches the engine run directly with the same seeds', async () => {
    const t = await teamWithDesign('sweep')
    const created = await t.client.post('/api/sweeps', { designId: t.design.id, axes: AXES, seed: 4242, precision: { rays: 120_000 } })
    expect(created.status).toBe(201)
    const sweep = created.body.sweep
    expect(sweep.cellsTotal).toBe(4)

    // The stream answers at once with the current state (nothing traced yet: no worker exists).
    const stream = readEvents(inject('baseUrl'), `/api/sweeps/${sweep.id}/events`, t.client.cookie,
      (evs) => evs.some((e) => e.event === 'end'))
    await new Promise((r) => setTimeout(r, 300))
    const w = worker(1)
    await w.ready
    const { status, events } = await stream
    expect(status).toBe(200)
    const progress = events.filter((e) => e.event === 'progress').map((e) => JSON.parse(e.data))
    expect(progress.length).toBeGreaterThanOrEqual(2)
    expect(progress[0].runId).toBe(sweep.id)
    expect(progress.at(-1).status).toBe('done')
    expect(progress.at(-1).cellsFinished).toBe(4)
    expect(progress.at(-1).bestCell).not.toBeNull()
    // Counts only grow.
    for (let i = 1; i < progress.length; i++) expect(progress[i].raysDone).toBeGreaterThanOrEqual(progress[i - 1].raysDone)

    const detail = await t.client.get(`/api/sweeps/${sweep.id}`)
    expect(detail.status).toBe(200)
    const cells = detail.body.cells as Array<{
      cellIndex: number; status: string; summary: any; infeasibleReason: string | null; raysDone: number; seed: number
    }>
    expect(cells.map((c) => c.status)).toEqual(['done', 'infeasible', 'done', 'infeasible'])
    expect(cells[1]!.infeasibleReason).toMatch(/fill factor 0.95 is above the hexagonal maximum/)

    const base = scenarioSchema.parse(t.design.scenario)
    for (const c of cells.filter((x) => x.status === 'done')) {
      const coords = [[2, 0.6], [2, 0.95], [3, 0.6], [3, 0.95]][c.cellIndex]!
      const r = cellScenario(base, AXES, coords)
      expect(r.ok).toBe(true)
      if (!r.ok) continue
      expect(c.seed).toBe(cellSeed(4242, c.cellIndex))
      const direct = traceScenario(r.scenario, { rays: 120_000, seed: c.seed })
      // Integer tallies: the queue's batches of 50 000 + 50 000 + 20 000 rays give exactly the engine's numbers.
      expect(c.raysDone).toBe(120_000)
      expect(c.summary.extraction).toBe(direct.extraction)
      expect(c.summary.enhancement).toBe(direct.enhancement)
      expect(c.summary.losses).toEqual(direct.losses)
      const full = await t.client.get(`/api/sweeps/${sweep.id}/cells/${c.cellIndex}`)
      expect(full.status).toBe(200)
      expect(full.body.result.intensity.perSteradian).toEqual(direct.intensity.perSteradian)
      expect(full.body.result.intensity.map.perSteradian).toEqual(direct.intensity.map.perSteradian)
    }
    const best = cells.filter((c) => c.status === 'done').sort((a, b) => b.summary.enhancement - a.summary.enhancement)[0]!
    expect(detail.body.run.bestCellIndex).toBe(best.cellIndex)
    // Every batch was counted exactly once.
    const { rows } = await pool.query(
      `SELECT b.status, count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1 GROUP BY b.status`, [sweep.id])
    expect(rows).toEqual([{ status: 'done', n: 6 }])
    await w.kill()
  })

  it('survives a worker killed with SIGKILL mid-batch: a second worker finishes, every cell exactly once', async () => {
    const t = await teamWithDesign('crash')
    const created = await t.client.post('/api/sweeps', {
      designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', values: [1.5, 2.5, 3.5] }], seed: 99, precision: { rays: 200_000 },
    })
    expect(created.status).toBe(201)
    const id = created.body.sweep.id as string
    const a = worker(1)
    await a.ready
    // Catch worker A holding a batch it has started but not finished, and kill it without warning.
    const victim = await killMidBatch(pool, a, id)
    const b = worker(1)
    await b.ready
    const run = await waitForRunEnd(id)
    expect(run.status).toBe('done')
    const { rows: cells } = await pool.query(`SELECT cell_index, status, rays_done, summary, seed, scenario FROM run_cells WHERE run_id = $1 ORDER BY cell_index`, [id])
    expect(cells.map((c) => c.status)).toEqual(['done', 'done', 'done'])
    for (const c of cells) {
      expect(Number(c.rays_done)).toBe(200_000)
      const direct = traceScenario(scenarioSchema.parse(c.scenario), { rays: 200_000, seed: Number(c.seed) })
      expect(c.summary.extraction).toBe(direct.extraction)
    }
    // The batch A was tracing was taken again (after its expiry) and counted once.
    const { rows: [again] } = await pool.query(
      `SELECT status, attempts FROM run_batches WHERE cell_id = $1 AND batch_index = $2`, [victim.cell_id, victim.batch_index])
    expect(again.status).toBe('done')
    expect(again.attempts).toBeGreaterThanOrEqual(2)
    const { rows: [counts] } = await pool.query(
      `SELECT count(*)::int AS n, count(*) FILTER (WHERE b.status = 'done')::int AS done FROM run_batches b
       JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1`, [id])
    expect(counts).toEqual({ n: 12, done: 12 })
    expect(Number(run.rays_done)).toBe(3 * 200_000) // device rays only: the flat companion comes from quadrature
    await b.kill()
  })

  it('cancelling stops queued and running cells, and nothing is counted afterwards', async () => {
    const t = await teamWithDesign('cancel')
    const created = await t.client.post('/api/sweeps', {
      designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', start: 1, stop: 4, steps: 4 }], precision: { rays: 400_000 },
    })
    expect(created.status).toBe(201)
    const id = created.body.sweep.id as string
    const w = worker(1)
    await w.ready
    await waitFor('two batches done', async () => {
      const { rows: [r] } = await pool.query(
        `SELECT count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1 AND b.status = 'done'`, [id])
      return r.n >= 2
    })
    const res = await t.client.post(`/api/sweeps/${id}/cancel`)
    expect(res.status).toBe(200)
    expect(res.body).toEqual({ cancelled: true, status: 'cancelled' })
    const doneAt = (await pool.query(
      `SELECT count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1 AND b.status = 'done'`, [id])).rows[0].n
    await new Promise((r) => setTimeout(r, 3000))
    const { rows } = await pool.query(
      `SELECT b.status, count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1 GROUP BY b.status ORDER BY b.status`, [id])
    expect(rows.find((r) => r.status === 'done')!.n).toBe(doneAt)
    expect(rows.find((r) => r.status === 'queued')).toBeUndefined()
    expect(rows.find((r) => r.status === 'cancelled')!.n).toBe(32 - doneAt)
    const { rows: cells } = await pool.query(`SELECT status FROM run_cells WHERE run_id = $1`, [id])
    expect(cells.every((c) => c.status === 'cancelled' || c.status === 'done')).toBe(true)
    expect(cells.some((c) => c.status === 'cancelled')).toBe(true)
    // Queued jobs were withdrawn from the queue.
    const { rows: [q] } = await pool.query(
      `SELECT count(*) FILTER (WHERE j.state IN ('created', 'retry'))::int AS waiting FROM pgboss.job j
       WHERE j.id IN (SELECT b.job_id FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1)`, [id])
    expect(q.waiting).toBe(0)
    expect((await t.client.post(`/api/sweeps/${id}/cancel`)).status).toBe(409)
    await w.kill()
  })

  it('a precision target adds batches until the standard error is met, or stops at the ray cap and says so', async () => {
    const t = await teamWithDesign('target')
    const w = worker(1)
    await w.ready
    const reach = await t.client.post('/api/runs', { designId: t.design.id, precision: { targetStdErr: 0.002, rayCap: 400_000 } })
    expect(reach.status).toBe(201)
    const capped = await t.client.post('/api/runs', { designId: t.design.id, precision: { targetStdErr: 0.0002, rayCap: 50_000 } })
    expect(capped.status).toBe(201)
    await waitForRunEnd(reach.body.run.id)
    await waitForRunEnd(capped.body.run.id)
    const r1 = (await t.client.get(`/api/runs/${reach.body.run.id}`)).body.cells[0]
    expect(r1.stopReason).toBe('target')
    expect(r1.summary.extractionStdErr).toBeLessThanOrEqual(0.002)
    expect(r1.raysDone).toBeGreaterThan(50_000)
    expect(r1.raysDone).toBeLessThan(400_000)
    const r2 = (await t.client.get(`/api/runs/${capped.body.run.id}`)).body.cells[0]
    expect(r2.stopReason).toBe('cap')
    expect(r2.raysDone).toBe(50_000)
    expect(r2.summary.extractionStdErr).toBeGreaterThan(0.0002)
    await w.kill()
  })
})

describe('who may start, see and stream runs', () => {
  let demoProjectId = ''
  beforeAll(async () => {
    demoProjectId = (await loadDemoData(dbFromPool(pool))).projectId
  })

  async function demoClient(role: 'lead' | 'designer' | 'viewer') {
    const u = DEMO_USERS.find((d) => d.role === role)!
    const client = new ApiClient()
    expect((await client.post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(200)
    return client
  }

  it('a viewer gets 403 on starting a run or sweep, and nothing is stored', async () => {
    const viewer = await demoClient('viewer')
    const designs = (await viewer.get(`/api/projects/${demoProjectId}/designs`)).body.designs
    const lens = designs.find((d: any) => d.scenario.lensArray)
    const before = (await pool.query('SELECT count(*)::int AS n FROM runs')).rows[0].n
    const run = await viewer.post('/api/runs', { designId: lens.id })
    expect(run.status).toBe(403)
    expect(run.body.message).toMatch(/viewer/)
    expect((await viewer.post('/api/sweeps', { designId: lens.id, axes: AXES })).status).toBe(403)
    expect((await pool.query('SELECT count(*)::int AS n FROM runs')).rows[0].n).toBe(before)
    // Reading is allowed.
    expect((await viewer.get(`/api/runs?projectId=${demoProjectId}`)).status).toBe(200)
  })

  it("another team's sweep is 404 on every route, and its stream refuses outsiders and the signed-out", async () => {
    const t = await teamWithDesign('private')
    // enough rays that the sweep is still waiting or tracing when its owner's stream opens (cancelled at the end)
    const created = await t.client.post('/api/sweeps', { designId: t.design.id, axes: AXES, precision: { rays: 400_000 } })
    expect(created.status).toBe(201)
    const id = created.body.sweep.id
    const other = await signedUpClient('nosy')
    expect((await other.client.get(`/api/sweeps/${id}`)).status).toBe(404)
    expect((await other.client.get(`/api/runs/${id}`)).status).toBe(404)
    expect((await other.client.get(`/api/sweeps/${id}/cells/0`)).status).toBe(404)
    expect((await other.client.post(`/api/sweeps/${id}/cancel`)).status).toBe(404)
    expect((await other.client.get(`/api/runs?projectId=${t.projectId}`)).status).toBe(404)
    expect((await other.client.post('/api/runs', { designId: t.design.id })).status).toBe(404)
    const outsider = await readEvents(inject('baseUrl'), `/api/sweeps/${id}/events`, other.client.cookie, () => true)
    expect(outsider.status).toBe(404)
    const anon = await readEvents(inject('baseUrl'), `/api/sweeps/${id}/events`, '', () => true)
    expect(anon.status).toBe(401)
    // The owner's stream opens with the current state.
    const own = await readEvents(inject('baseUrl'), `/api/sweeps/${id}/events`, t.client.cookie, (evs) => evs.length > 0)
    expect(own.status).toBe(200)
    expect(own.events[0]!.event).toBe('progress')
    const first = JSON.parse(own.events[0]!.data)
    expect(first).toMatchObject({ runId: id, cellsTotal: 4 })
    expect(['queued', 'running']).toContain(first.status)
    expect((await t.client.post(`/api/sweeps/${id}/cancel`)).status).toBe(200)
  })

  it('an invalid sweep body gets 400 with the field named and creates nothing', async () => {
    const t = await teamWithDesign('invalid')
    const count = async () => (await pool.query('SELECT count(*)::int AS n FROM runs WHERE project_id = $1', [t.projectId])).rows[0].n
    const noSteps = await t.client.post('/api/sweeps', { designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', start: 1, stop: 2 }] })
    expect(noSteps.status).toBe(400)
    expect(noSteps.body.message).toContain('axes.0.steps')
    const unknown = await t.client.post('/api/sweeps', { designId: t.design.id, axes: [{ parameter: 'lensArray.tint', values: [1] }] })
    expect(unknown.status).toBe(400)
    expect(unknown.body.message).toContain('axes.0.parameter')
    const noCells = await t.client.post('/api/sweeps', { designId: t.design.id, axes: [{ parameter: 'lensArray.sagUm', values: [6, 7] }] })
    expect(noCells.status).toBe(400)
    expect(noCells.body.message).toMatch(/No cell of this sweep can be built: .*Sag h must be at most D\/2/)
    // two feasible cells × 6·10⁸ rays against the 10⁹ team limit (no companion rays: the flat device is exact)
    const tooMany = await t.client.post('/api/sweeps', { designId: t.design.id, axes: AXES, precision: { rays: 600_000_000 } })
    expect(tooMany.status).toBe(429)
    expect(tooMany.body.message).toMatch(/limit is/)
    expect(await count()).toBe(0)
  })
})
