// The batch worker: takes ray batches from the queue, traces them on the piscina pool, and merges the counts into
// the cell under row locks. The merge marks the batch done in the same transaction, so a batch that is retried
// after its worker died (pg-boss expiry) or delivered twice is counted once. When a cell's last batch lands the
// cell is summarised (or, with a precision target, given more batches); when the last cell lands the run is done
// and its best cell recorded. Progress goes out as NOTIFY with the run id only.
import { hostname } from 'node:os'
import type pg from 'pg'
import type { Piscina } from 'piscina'
import { createTally, mergeRunTallies, runTalliesFromBuffer, summarize, CHUNK_RAYS, type RunTallies } from '../../shared/optics'
import { ENGINE_VERSION } from '../../shared/optics/version'
import { fresnelModeOf } from '../../shared/types/scenario'
import { usePool } from '../utils/db'
import { useBoss } from './boss'
import { CHANNEL_CANCEL, CHANNEL_PROGRESS, jobSettings, QUEUE_BATCH, QUEUE_DEAD } from './config'
import { listen } from './listen'
import { createTracePool, defaultThreads } from './pool'
import { batchJobs, bestCell, enqueueInTransaction, planBatches, tallyFromBytes, tallyToBytes, teamQueuedBatches, withTransaction, type CellSummary } from './runs'
import { reportRunClosed } from './run-mail'
import { chunkEventBudget } from './cost'

interface BatchJobData { cellId: string; batchIndex: number }

const OPEN = ['queued', 'running']

// device tally then the companion's, with or without the colour block (shared/optics run.ts)
const splitBuffer = runTalliesFromBuffer

/** The compact figures kept beside the counts for lists, maps and ranking. */
export function cellSummary(r: ReturnType<typeof summarize>): CellSummary {
  return {
    rays: r.rays,
    extraction: r.extraction,
    extractionStdErr: r.extractionStdErr,
    enhancement: r.enhancement,
    enhancementStdErr: r.enhancementStdErr,
    planarExtraction: r.planar.extraction,
    planarExtractionStdErr: r.planar.extractionStdErr,
    onAxisLuminance: r.luminance.onAxisRelative,
    onAxisLuminanceStdErr: r.luminance.onAxisRelativeStdErr,
    halfLuminanceAngleDeg: r.luminance.halfLuminanceAngleDeg,
    pixelOnAxisGain: r.pixel ? r.pixel.onAxisEnhancement : null,
    pixelOnAxisGainStdErr: r.pixel ? r.pixel.onAxisEnhancementStdErr : null,
    maxDeltaUvTo60: r.colour ? r.colour.maxDeltaUvTo60 : null,
    maxDeltaUvTo60StdErr: r.colour ? r.colour.maxDeltaUvTo60StdErr : null,
    photopicOnAxisGain: r.photopicOnAxisGain ?? null,
    photopicOnAxisGainStdErr: r.photopicOnAxisGainStdErr ?? null,
    losses: r.losses,
    lossesStdErr: r.lossesStdErr,
  }
}

/**
 * Marks the run done (or failed when no cell finished) once every cell has finished. Call inside the run lock.
 * Returns true when this call closed the run (the caller reports it after its transaction commits).
 */
async function finishRunIfComplete(client: pg.PoolClient, runId: string): Promise<boolean> {
  const { rows: [run] } = await client.query(
    `SELECT status, figure, cells_total, cells_finished FROM runs WHERE id = $1`, [runId])
  if (!run || !OPEN.includes(run.status) || run.cells_finished < run.cells_total) return false
  const { rows: cells } = await client.query(
    `SELECT cell_index, status, summary FROM run_cells WHERE run_id = $1`, [runId])
  const best = bestCell(cells.map((c) => ({ cellIndex: c.cell_index, status: c.status, summary: c.summary })), run.figure)
  const anyDone = cells.some((c) => c.status === 'done')
  await client.query(
    `UPDATE runs SET status = $2::run_status, best_cell_index = $3, finished_at = now(),
       error = CASE WHEN $2::text = 'failed' THEN 'every cell failed; see the cells for the reasons' ELSE error END
     WHERE id = $1`,
    [runId, anyDone ? 'done' : 'failed', best])
  return true
}

/** One transaction on a dedicated client (shared with the run routes: server/jobs/runs.ts). */
function inTransaction<T>(fn: (c: pg.PoolClient) => Promise<T>): Promise<T> {
  return withTransaction((_tx, client) => fn(client))
}

/** Adds one traced batch to its cell; returns false when the batch was already counted or the run ended. */
export async function commitBatch(cellId: string, batchIndex: number, tallies: RunTallies, computeMs: number, worker: string): Promise<boolean> {
  let closedRun: string | null = null
  const counted = await inTransaction(async (client) => {
    const { rows: [cellRef] } = await client.query(`SELECT run_id FROM run_cells WHERE id = $1`, [cellId])
    if (!cellRef) return false
    const runId = cellRef.run_id as string
    // Lock order everywhere: run, then cell, then batch.
    const { rows: [run] } = await client.query(
      `SELECT status, rays_per_cell, target_std_err, ray_cap, batch_rays FROM runs WHERE id = $1 FOR UPDATE`, [runId])
    const { rows: [cell] } = await client.query(
      `SELECT status, seed, rays_planned, rays_done, device_tally, planar_tally, scenario FROM run_cells WHERE id = $1 FOR UPDATE`, [cellId])
    const { rows: [batch] } = await client.query(
      `SELECT status, ray_count FROM run_batches WHERE cell_id = $1 AND batch_index = $2 FOR UPDATE`, [cellId, batchIndex])
    if (!run || !cell || !batch) return false
    if (batch.status !== 'queued' || !OPEN.includes(cell.status) || !OPEN.includes(run.status)) return false

    const stored: RunTallies = {
      device: tallyFromBytes(cell.device_tally) ?? createTally(),
      planar: tallies.planar ? (tallyFromBytes(cell.planar_tally) ?? createTally()) : null,
    }
    mergeRunTallies(stored, tallies)
    const rayCount = batch.ray_count as number
    const companion = tallies.planar ? 2 : 1
    const raysDone = Number(cell.rays_done) + rayCount
    await client.query(
      `UPDATE run_batches SET status = 'done', compute_ms = $3, worker = $4, completed_at = now()
       WHERE cell_id = $1 AND batch_index = $2`, [cellId, batchIndex, Math.round(computeMs), worker])
    const { rows: [{ n: remaining }] } = await client.query(
      `SELECT count(*)::int AS n FROM run_batches WHERE cell_id = $1 AND status = 'queued'`, [cellId])

    let cellUpdate = `status = 'running'`
    const params: unknown[] = [cellId, tallyToBytes(stored.device), tallyToBytes(stored.planar), raysDone, Math.round(computeMs)]
    let finished = false
    let addedRays = 0
    if (remaining === 0) {
      const result = summarize(stored, Number(cell.seed), fresnelModeOf(cell.scenario))
      const target = run.target_std_err as number | null
      const cap = run.ray_cap === null ? null : Number(run.ray_cap)
      if (target !== null && cap !== null && result.extractionStdErr > target && raysDone < cap) {
        // Rays needed scale as (σ/target)²; 5 % over so the next round usually ends it.
        const need = Math.ceil(raysDone * (result.extractionStdErr / target) ** 2 * 1.05) - raysDone
        addedRays = Math.max(1000, Math.min(need, cap - raysDone))
        const { rows: [{ m }] } = await client.query(
          `SELECT max(batch_index)::int AS m FROM run_batches WHERE cell_id = $1`, [cellId])
        const planned = planBatches(Number(cell.rays_planned), addedRays, run.batch_rays, m + 1)
        for (const b of planned) {
          await client.query(
            `INSERT INTO run_batches (cell_id, batch_index, first_ray, ray_count, job_id) VALUES ($1, $2, $3, $4, $5)`,
            [cellId, b.batchIndex, b.firstRay, b.rayCount, b.jobId])
        }
        await enqueueInTransaction(client, batchJobs(cellId, planned, await teamQueuedBatches(client, runId)))
        cellUpdate += `, rays_planned = rays_planned + ${addedRays}`
      } else {
        const stopReason = target === null ? 'rays' : result.extractionStdErr <= target ? 'target' : 'cap'
        cellUpdate = `status = 'done', summary = $6, stop_reason = $7, finished_at = now(), engine_version = $8`
        params.push(JSON.stringify(cellSummary(result)), stopReason, ENGINE_VERSION)
        finished = true
      }
    }
    await client.query(
      `UPDATE run_cells SET ${cellUpdate}, device_tally = $2, planar_tally = $3, rays_done = $4,
         compute_ms = compute_ms + $5 WHERE id = $1`, params)
    await client.query(
      `UPDATE runs SET rays_done = rays_done + $2, rays_planned = rays_planned + $3,
         cells_finished = cells_finished + $4 WHERE id = $1`,
      [runId, rayCount * companion, addedRays * companion, finished ? 1 : 0])
    if (finished && await finishRunIfComplete(client, runId)) closedRun = runId
    await client.query('SELECT pg_notify($1, $2)', [CHANNEL_PROGRESS, runId])
    return true
  })
  if (closedRun) reportRunClosed(closedRun)
  return counted
}

/** A batch that used up its retries: its cell fails with the last error, the run goes on without it. */
export async function failBatch(cellId: string, batchIndex: number, reason: string): Promise<void> {
  let closedRun: string | null = null
  const withdrawn = await inTransaction(async (client) => {
    const { rows: [cellRef] } = await client.query(`SELECT run_id FROM run_cells WHERE id = $1`, [cellId])
    if (!cellRef) return []
    const runId = cellRef.run_id as string
    const { rows: [run] } = await client.query(`SELECT status FROM runs WHERE id = $1 FOR UPDATE`, [runId])
    const { rows: [cell] } = await client.query(`SELECT status FROM run_cells WHERE id = $1 FOR UPDATE`, [cellId])
    const { rows: [batch] } = await client.query(
      `SELECT status, attempts, error FROM run_batches WHERE cell_id = $1 AND batch_index = $2 FOR UPDATE`, [cellId, batchIndex])
    if (!run || !cell || !batch || batch.status !== 'queued') return []
    const why = batch.error ?? reason
    await client.query(`UPDATE run_batches SET status = 'failed' WHERE cell_id = $1 AND batch_index = $2`, [cellId, batchIndex])
    const { rows: others } = await client.query(
      `UPDATE run_batches SET status = 'cancelled' WHERE cell_id = $1 AND status = 'queued' RETURNING job_id`, [cellId])
    if (OPEN.includes(cell.status) && OPEN.includes(run.status)) {
      await client.query(
        `UPDATE run_cells SET status = 'failed', finished_at = now(), error = $2 WHERE id = $1`,
        [cellId, `batch ${batchIndex} failed after ${batch.attempts} attempt(s): ${why}`])
      await client.query(`UPDATE runs SET cells_finished = cells_finished + 1 WHERE id = $1`, [runId])
      if (await finishRunIfComplete(client, runId)) closedRun = runId
    }
    await client.query('SELECT pg_notify($1, $2)', [CHANNEL_PROGRESS, runId])
    return others.map((o) => o.job_id as string)
  })
  if (closedRun) reportRunClosed(closedRun)
  if (withdrawn.length) {
    const boss = await useBoss()
    await boss.cancel(QUEUE_BATCH, withdrawn).catch(() => {})
  }
}

export interface BatchWorker {
  name: string
  threads: number
  /** Stops taking jobs, waits up to graceMs for running batches, then aborts what is left (it is retried). */
  stop(graceMs?: number): Promise<void>
}

class Cancelled extends Error {}
/** A batch that ran past its time: failed once, never retried (the same rays would take as long again). */
class TooSlow extends Error {}

/** Traces one batch on the pool; chunk boundaries follow the core's fixed chunking, so results never depend on it. */
async function traceBatch(pool: Piscina, scenario: unknown, firstRay: number, rayCount: number, seed: number,
  budget: { batchEvents: number | null; batchRays: number }, signal: AbortSignal): Promise<RunTallies> {
  const tasks: Array<Promise<ArrayBuffer>> = []
  for (let first = firstRay; first < firstRay + rayCount; first += CHUNK_RAYS) {
    const count = Math.min(CHUNK_RAYS, firstRay + rayCount - first)
    const eventBudget = chunkEventBudget(budget.batchEvents, budget.batchRays, count)
    tasks.push(pool.run({ scenario, firstRay: first, rayCount: count, seed, eventBudget }, { signal }))
  }
  const bufs = await Promise.all(tasks)
  let total: RunTallies | null = null
  for (const b of bufs) {
    const t = splitBuffer(b)
    if (!total) total = { device: createTally(), planar: t.planar ? createTally() : null }
    mergeRunTallies(total, t)
  }
  return total!
}

/** Starts a worker in this process: `threads` queue subscriptions feeding one pool of `threads` threads. */
export async function startBatchWorker(opts: { threads?: number } = {}): Promise<BatchWorker> {
  const threads = opts.threads ?? defaultThreads()
  const settings = jobSettings()
  const name = `${hostname()}:${process.pid}`
  const pool = await createTracePool(threads)
  const boss = await useBoss()
  const db = usePool()
  const active = new Map<string, Set<AbortController>>()
  const cancelListener = listen([CHANNEL_CANCEL], (_ch, runId) => {
    for (const ac of active.get(runId) ?? []) ac.abort(new Cancelled('run cancelled'))
  })

  const inFlight = new Set<Promise<unknown>>()
  const track = <T>(p: Promise<T>): Promise<T> => {
    inFlight.add(p)
    void p.finally(() => inFlight.delete(p)).catch(() => {})
    return p
  }

  const handle = async (data: BatchJobData, expireInSeconds: number) => {
    const { rows: [row] } = await db.query(
      `SELECT b.status AS batch_status, b.first_ray, b.ray_count, c.run_id, c.status AS cell_status, c.scenario, c.seed,
              r.status AS run_status, r.batch_events, r.batch_rays
       FROM run_batches b JOIN run_cells c ON c.id = b.cell_id JOIN runs r ON r.id = c.run_id
       WHERE b.cell_id = $1 AND b.batch_index = $2`, [data.cellId, data.batchIndex])
    if (!row || row.batch_status !== 'queued' || !OPEN.includes(row.cell_status) || !OPEN.includes(row.run_status)) return { skipped: true }
    const runId = row.run_id as string
    await db.query(`UPDATE run_batches SET attempts = attempts + 1, worker = $3 WHERE cell_id = $1 AND batch_index = $2`,
      [data.cellId, data.batchIndex, name])
    const changed = await db.query(
      `WITH c AS (UPDATE run_cells SET status = 'running', started_at = COALESCE(started_at, now())
                  WHERE id = $1 AND status = 'queued' RETURNING 1),
            r AS (UPDATE runs SET status = 'running', started_at = COALESCE(started_at, now())
                  WHERE id = $2 AND status = 'queued' RETURNING 1)
       SELECT (SELECT count(*) FROM c) + (SELECT count(*) FROM r) AS n`, [data.cellId, runId])
    if (Number(changed.rows[0].n) > 0) await db.query('SELECT pg_notify($1, $2)', [CHANNEL_PROGRESS, runId])

    const ac = new AbortController()
    let set = active.get(runId)
    if (!set) active.set(runId, (set = new Set()))
    set.add(ac)
    // The event budget keeps a batch well inside its expiry; one that still runs long (an overloaded machine) is
    // stopped a little before pg-boss would expire it and failed for good, so a retry cannot hold a thread as long again.
    const timer = setTimeout(() => ac.abort(new TooSlow(
      `the batch took longer than its ${Math.round(expireInSeconds)} s limit on the tracing thread; it was stopped and not retried`)),
    expireInSeconds * 900)
    const t0 = performance.now()
    try {
      const tallies = await traceBatch(pool, row.scenario, Number(row.first_ray), row.ray_count, Number(row.seed),
        { batchEvents: row.batch_events === null ? null : Number(row.batch_events), batchRays: row.batch_rays }, ac.signal)
      await commitBatch(data.cellId, data.batchIndex, tallies, performance.now() - t0, name)
      return { rays: row.ray_count }
    } catch (err) {
      if (ac.signal.reason instanceof Cancelled) return { cancelled: true }
      if (ac.signal.reason instanceof TooSlow) {
        const why = ac.signal.reason.message
        await db.query(`UPDATE run_batches SET error = $3 WHERE cell_id = $1 AND batch_index = $2`,
          [data.cellId, data.batchIndex, why]).catch(() => {})
        await failBatch(data.cellId, data.batchIndex, why)
        return { failed: why }
      }
      const message = err instanceof Error ? err.message : String(err)
      await db.query(`UPDATE run_batches SET error = $3 WHERE cell_id = $1 AND batch_index = $2`,
        [data.cellId, data.batchIndex, message.slice(0, 500)]).catch(() => {})
      throw err
    } finally {
      clearTimeout(timer)
      set.delete(ac)
      if (set.size === 0) active.delete(runId)
    }
  }

  const workIds: string[] = []
  for (let i = 0; i < threads; i++) {
    let workId = ''
    workId = await boss.work<BatchJobData>(QUEUE_BATCH, { batchSize: 1, pollingIntervalSeconds: settings.pollingSeconds },
      async ([job]) => {
        const r = await track(handle(job!.data, job!.expireInSeconds))
        // pg-boss would otherwise pause a polling interval before fetching again; while batches are waiting,
        // go straight on to the next one.
        if (workId) boss.notifyWorker(workId)
        return r
      })
    workIds.push(workId)
  }
  workIds.push(await boss.work<BatchJobData>(QUEUE_DEAD, { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
    await failBatch(job!.data.cellId, job!.data.batchIndex, 'retries used up')
  }))

  return {
    name,
    threads,
    async stop(graceMs = 10_000) {
      for (const id of workIds) await boss.offWork({ id }).catch(() => {})
      if (inFlight.size) {
        let timer: ReturnType<typeof setTimeout> | undefined
        await Promise.race([
          Promise.allSettled([...inFlight]),
          new Promise((r) => { timer = setTimeout(r, graceMs) }),
        ])
        clearTimeout(timer)
      }
      for (const set of active.values()) for (const ac of set) ac.abort(new Error('worker stopping'))
      await cancelListener.close()
      await pool.destroy()
    },
  }
}
