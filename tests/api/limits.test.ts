// Abuse limits on the tracer, against the built server, real worker processes and a real PostgreSQL: work per ray
// and per batch is bounded (refused at creation by a pilot trace, cut short by the batch's event budget, a batch past
// its time failed once and not retried), teams share the tracing thread in turn, and the team ray limit holds
// under concurrent requests and counts a precision run's ray cap.
// Server settings for tests (tests/api/global-setup.ts): 50 000-ray batches, 8 s expiry, so 8·10⁶ encounters per
// batch (80 per ray for the device stream and as many for its companion); team ray limit 10⁹ (the default).
import pg from 'pg'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { createTally, mergeRunTallies, prepareRun, summarize, traceChunk, CHUNK_RAYS, type RunTallies } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { chunkEventBudget } from '../../server/runs/cost'
import { validScenario } from './client'
import { startWorkerProcess, teamWithDesign, waitForRunEnd, type WorkerProcess } from './jobs'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
const workers: WorkerProcess[] = []
afterAll(async () => {
  for (const w of workers) await w.kill('SIGKILL')
  await pool.end()
})
async function worker() {
  const w = startWorkerProcess(1)
  workers.push(w)
  await w.ready
  return w
}

// A lossless mirror, n = 4 throughout, caps 0.001 µm high over a 1 000 µm pitch: light circulates by total
// internal reflection; measured ≈ 97 000 encounters per ray at maxEvents 100 000.
const cavity = {
  emitter: { index: 4, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 1, diffuseFraction: 0 },
  substrate: { index: 4, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 1000, diameterUm: 1000, sagUm: 0.001, shape: 'spherical', index: 4 },
  trace: { rays: 2000, seed: 3, fresnel: 'averaged', maxEvents: 100_000 },
}
const planar = { ...validScenario, lensArray: null, trace: { ...validScenario.trace, rays: 60_000, seed: 4 } }

describe('work per ray and per batch', () => {
  it('maxEvents above 100 000 is refused when the design is saved', async () => {
    const t = await teamWithDesign('maxev')
    const r = await t.client.post(`/api/projects/${t.projectId}/designs`, {
      name: 'Endless', scenario: { ...cavity, trace: { ...cavity.trace, maxEvents: 1e7 } },
    })
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(/Event limit per ray must be at most 100000/)
  })

  it('a runaway geometry is refused at creation (pilot trace) with a plain reason, and nothing is stored', async () => {
    const t = await teamWithDesign('runaway', cavity)
    const r = await t.client.post('/api/runs', { designId: t.design.id })
    expect(r.status).toBe(422)
    expect(r.body.message).toMatch(/too costly to trace: a pilot of 256 rays took more than [\d .]+ interface and reflector encounters per ray, and a batch allows 80 per ray/)
    const s = await t.client.post('/api/sweeps', { designId: t.design.id, axes: [{ parameter: 'reflector.reflectance', values: [0.5, 1] }] })
    expect(s.status).toBe(422)
    expect(s.body.message).toMatch(/\(cell 1\)/)
    const { rows: [n] } = await pool.query('SELECT count(*)::int AS n FROM runs WHERE project_id = $1', [t.projectId])
    expect(n.n).toBe(0)
  })

  it('a costly but feasible geometry is accepted with its warnings stored on the run', async () => {
    // Pilot rays that reach maxEvents (here 50) are reported before anything is traced.
    const t = await teamWithDesign('costly', { ...cavity, trace: { ...cavity.trace, maxEvents: 50 } })
    const r = await t.client.post('/api/runs', { designId: t.design.id })
    expect(r.status).toBe(201)
    const got = await t.client.get(`/api/runs/${r.body.run.id}`)
    expect(got.body.run.warnings.join(' ')).toMatch(/of 256 pilot rays ended unresolved \(more than maxEvents encounters\)/)
    expect((await t.client.post(`/api/runs/${r.body.run.id}/cancel`)).status).toBe(200)
  })

  it('rays past a batch\'s event budget are counted unresolved, exactly as the engine counts them for that budget', async () => {
    const t = await teamWithDesign('budget')
    const r = await t.client.post('/api/runs', { designId: t.design.id })
    expect(r.status).toBe(201)
    const id = r.body.run.id as string
    // A tight budget (4 encounters per ray and stream; this film needs ≈ 7.6 on the device) set before any worker runs.
    const batchEvents = 400_000
    await pool.query('UPDATE runs SET batch_events = $2 WHERE id = $1', [id, batchEvents])
    await worker()
    const run = await waitForRunEnd(pool, id)
    expect(run.status).toBe('done')
    const { rows: [cell] } = await pool.query('SELECT summary, rays_done, seed, scenario FROM run_cells WHERE run_id = $1', [id])
    expect(Number(cell.rays_done)).toBe(60_000)
    // The same ray ranges and budgets traced here: bitwise the same counts.
    const scenes = prepareRun(scenarioSchema.parse(cell.scenario))
    const total: RunTallies = { device: createTally(), planar: scenes.planar ? createTally() : null }
    for (const [first, count] of [[0, 50_000], [50_000, 10_000]] as const) {
      for (let f = first; f < first + count; f += CHUNK_RAYS) {
        const n = Math.min(CHUNK_RAYS, first + count - f)
        mergeRunTallies(total, traceChunk(scenes, f, n, Number(cell.seed), undefined, chunkEventBudget(batchEvents, 50_000, n)))
      }
    }
    const direct = summarize(total, Number(cell.seed))
    expect(cell.summary.losses).toEqual(direct.losses)
    expect(cell.summary.losses.unresolved).toBeGreaterThan(0.2)
    const { rows: batches } = await pool.query(
      `SELECT b.status, b.attempts FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1`, [id])
    expect(batches.every((b) => b.status === 'done' && b.attempts === 1)).toBe(true)
  })

  it('a batch that runs past its time is failed once, not retried, and the cell says why', async () => {
    const t = await teamWithDesign('tooslow')
    const r = await t.client.post('/api/runs', { designId: t.design.id, precision: { rays: 50_000 } })
    expect(r.status).toBe(201)
    const id = r.body.run.id as string
    // A run from before the event budget (no budget stored) whose cell holds the runaway cavity: nothing bounds it
    // but the clock.
    await pool.query('UPDATE runs SET batch_events = NULL WHERE id = $1', [id])
    await pool.query('UPDATE run_cells SET scenario = $2 WHERE run_id = $1', [id, JSON.stringify(scenarioSchema.parse(cavity))])
    await worker()
    const run = await waitForRunEnd(pool, id, 60_000)
    expect(run.status).toBe('failed')
    const { rows: [cell] } = await pool.query('SELECT status, error FROM run_cells WHERE run_id = $1', [id])
    expect(cell.status).toBe('failed')
    expect(cell.error).toMatch(/failed after 1 attempt\(s\): the batch took longer than its 8 s limit on the tracing thread; it was stopped and not retried/)
    // Well after pg-boss's own expiry and retry delay: still one attempt.
    await new Promise((res) => setTimeout(res, 4000))
    const { rows: [b] } = await pool.query(
      `SELECT b.status, b.attempts FROM run_batches b JOIN run_cells c ON c.id = b.cell_id WHERE c.run_id = $1`, [id])
    expect(b).toMatchObject({ status: 'failed', attempts: 1 })
  })
})

describe('sharing the tracer between teams', () => {
  it("a second team's small run finishes while the first team's big sweep is still running", async () => {
    for (const w of workers.splice(0)) await w.kill('SIGKILL')
    const a = await teamWithDesign('sweeper')
    const b = await teamWithDesign('small')
    // 4 cells × 400 000 rays = 32 batches, queued before the small run's 2 batches.
    const big = await a.client.post('/api/sweeps', {
      designId: a.design.id, axes: [{ parameter: 'lensArray.sagUm', values: [1, 2, 3, 4] }], precision: { rays: 400_000 },
    })
    expect(big.status).toBe(201)
    const small = await b.client.post('/api/runs', { designId: b.design.id })
    expect(small.status).toBe(201)
    await worker()
    const done = await waitForRunEnd(pool, small.body.run.id, 90_000)
    expect(done.status).toBe('done')
    const { rows: [sweep] } = await pool.query('SELECT status, rays_done, rays_planned FROM runs WHERE id = $1', [big.body.sweep.id])
    expect(['queued', 'running']).toContain(sweep.status)
    expect(Number(sweep.rays_done)).toBeLessThan(Number(sweep.rays_planned) / 2)
    expect((await a.client.post(`/api/sweeps/${big.body.sweep.id}/cancel`)).status).toBe(200)
  })
})

describe('team ray limit', () => {
  it('10 concurrent requests of 4·10⁸ rays against a 10⁹ limit: exactly 2 are accepted, the rest get 429', async () => {
    for (const w of workers.splice(0)) await w.kill('SIGKILL')
    const t = await teamWithDesign('race', planar)
    const replies = await Promise.all(Array.from({ length: 10 }, () =>
      t.client.post('/api/runs', { designId: t.design.id, precision: { rays: 400_000_000 } })))
    const ok = replies.filter((r) => r.status === 201)
    const refused = replies.filter((r) => r.status === 429)
    expect(ok.length).toBe(2)
    expect(refused.length).toBe(8)
    for (const r of refused) {
      expect(r.body.message).toMatch(/This would queue 400 M rays, and at most 200 M more can be queued now: your team already has 800 M waiting and the limit is 1\.00 G\./)
    }
    for (const r of ok) expect((await t.client.post(`/api/runs/${r.body.run.id}/cancel`)).status).toBe(200)
  })

  it('a lens design over a pixel counts each ray twice: 5·10⁸ + 1 000 rays are refused in the user\'s rays, and the design says the limit', async () => {
    const t = await teamWithDesign('twice', { ...validScenario, emitter: { ...validScenario.emitter, source: { shape: 'disc', radiusUm: 200 } } })
    const got = await t.client.get(`/api/designs/${t.design.id}`)
    expect(got.body.teamRayLimit).toBe(1_000_000_000)
    const r = await t.client.post('/api/runs', { designId: t.design.id, precision: { rays: 500_001_000 } })
    expect(r.status).toBe(429)
    expect(r.body.message).toMatch(/This would queue 500 001 000 rays, and at most 500 M can be queued now: each ray of a lens design over a pixel source \(or with a spectrum\) is traced twice/)
  })

  it("a precision run holds its whole ray cap against the limit, not just its first batch", async () => {
    const t = await teamWithDesign('cap', planar)
    const first = await t.client.post('/api/runs', { designId: t.design.id, precision: { targetStdErr: 1e-6, rayCap: 600_000_000 } })
    expect(first.status).toBe(201)
    const second = await t.client.post('/api/runs', { designId: t.design.id, precision: { rays: 500_000_000 } })
    expect(second.status).toBe(429)
    expect(second.body.message).toMatch(/your team already has 600 M waiting/)
    expect((await t.client.post(`/api/runs/${first.body.run.id}/cancel`)).status).toBe(200)
    // Once cancelled, the cap is free again.
    const third = await t.client.post('/api/runs', { designId: t.design.id, precision: { rays: 500_000_000 } })
    expect(third.status).toBe(201)
    expect((await t.client.post(`/api/runs/${third.body.run.id}/cancel`)).status).toBe(200)
  })
})


