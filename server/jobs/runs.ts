// A run's life on the server side: create (expand the grid, plan ray batches, store everything and enqueue the
// batches in one transaction, so a crash leaves either the whole run or nothing), cancel, and read its state.
// Plain module with explicit imports: the routes, the embedded worker and `npm run worker` share it.
import { randomUUID } from 'node:crypto'
import { and, eq, inArray, sql } from 'drizzle-orm'
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres'
import type pg from 'pg'
import { ENGINE_VERSION } from '../../shared/optics/version'
import { scenarioSchema, type Scenario } from '../../shared/types/scenario'
import {
  AXIS_PARAMETERS, axisProblems, cellSeed, expandSweep, type Figure, type SweepAxis, type SweepCell,
} from '../../shared/types/sweep'
import * as schema from '../db/schema'
import { runBatches, runCells, runs, type Run, type RunCell } from '../db/schema'
import { usePool } from '../utils/db'
import { batchJobOptions, useBoss } from './boss'
import { CHANNEL_CANCEL, CHANNEL_PROGRESS, jobSettings, QUEUE_BATCH } from './config'
import { judgeCost } from './cost'

export type TxDb = NodePgDatabase<typeof schema>

/** Runs `fn` in one transaction on a dedicated client; the client is also handed out for pg-boss's inserts. */
export async function withTransaction<T>(fn: (tx: TxDb, client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await usePool().connect()
  try {
    await client.query('BEGIN')
    const result = await fn(drizzle(client, { schema }), client)
    await client.query('COMMIT')
    return result
  } catch (err) {
    await client.query('ROLLBACK').catch(() => {})
    throw err
  } finally {
    client.release()
  }
}

/** A stored tally (bytea of little-endian Float64 counts) as a Float64Array; copied, since a Buffer from the driver
 *  may start at any byte offset and a Float64Array needs 8-byte alignment. */
export function tallyFromBytes(b: Buffer | null): Float64Array | null {
  if (!b) return null
  const copy = new Uint8Array(b.byteLength)
  copy.set(b)
  return new Float64Array(copy.buffer)
}

export function tallyToBytes(t: Float64Array | null): Buffer | null {
  return t ? Buffer.from(t.buffer, t.byteOffset, t.byteLength) : null
}

/** A request the user can fix: the route turns it into a 400 (or 429 for the team limit) with this message. */
export class RunRequestError extends Error {
  constructor(message: string, readonly statusCode = 400, readonly details: string[] = []) {
    super(message)
  }
}

export interface PlannedBatch { batchIndex: number; firstRay: number; rayCount: number; jobId: string }

/** Splits rays [firstRay, firstRay + rays) into batches of at most batchRays, numbered from firstIndex. */
export function planBatches(firstRay: number, rays: number, batchRays: number, firstIndex = 0): PlannedBatch[] {
  const out: PlannedBatch[] = []
  let i = firstIndex
  for (let r = firstRay; r < firstRay + rays; r += batchRays, i++) {
    out.push({ batchIndex: i, firstRay: r, rayCount: Math.min(batchRays, firstRay + rays - r), jobId: randomUUID() })
  }
  return out
}

/**
 * The jobs pg-boss stores for planned batches of one cell. Fair sharing between teams: a team's n-th waiting batch
 * gets priority −n (`queuedAhead` = the team's batches already waiting), and the queue hands out the highest
 * priority first, so teams are served in turn and a small run is not stuck behind another team's long sweep.
 */
export function batchJobs(cellId: string, batches: PlannedBatch[], queuedAhead = 0) {
  const opts = batchJobOptions()
  return batches.map((b, i) => ({
    id: b.jobId,
    name: QUEUE_BATCH,
    data: { cellId, batchIndex: b.batchIndex },
    priority: -Math.min(queuedAhead + i, 2 ** 31 - 1),
    expireInSeconds: opts.expireInSeconds,
    retryLimit: opts.retryLimit,
    retryDelay: opts.retryDelay,
    retryBackoff: opts.retryBackoff,
    deadLetter: opts.deadLetter,
  }))
}

export async function enqueueInTransaction(client: pg.PoolClient, jobs: ReturnType<typeof batchJobs>) {
  if (jobs.length === 0) return
  const boss = await useBoss()
  await boss.insert(jobs, { db: { executeSql: (text, values) => client.query(text, values) } })
}

export interface CreateRunInput {
  kind: 'single' | 'sweep'
  projectId: string
  teamId: string
  design: { id: string; name: string; version: number; scenario: unknown }
  userId: string
  name?: string
  seed?: number
  precision?: { rays?: number; targetStdErr?: number; rayCap?: number }
  axes?: SweepAxis[]
  figure?: Figure
}

/**
 * Rays the team still has waiting in queued or running runs (device and planar companion): what each run reserved
 * (a precision run its ray cap), less what it has traced.
 */
async function teamOutstandingRays(tx: TxDb, teamId: string): Promise<number> {
  const r = await tx.execute(sql`
    SELECT COALESCE(SUM(GREATEST(COALESCE(r.rays_reserved, r.rays_planned) - r.rays_done, 0)), 0)::bigint AS n
    FROM runs r JOIN projects p ON p.id = r.project_id
    WHERE p.team_id = ${teamId} AND r.status IN ('queued', 'running')`)
  return Number((r.rows[0] as { n: string }).n)
}

/** Batches waiting in the queue for the team that owns `runId` (the fair-sharing priority counts from it). */
export async function teamQueuedBatches(client: pg.PoolClient, runId: string): Promise<number> {
  const { rows: [r] } = await client.query(
    `SELECT count(*)::int AS n FROM run_batches b JOIN run_cells c ON c.id = b.cell_id JOIN runs r ON r.id = c.run_id
       JOIN projects p ON p.id = r.project_id
     WHERE p.team_id = (SELECT p2.team_id FROM runs r2 JOIN projects p2 ON p2.id = r2.project_id WHERE r2.id = $1)
       AND b.status = 'queued' AND r.status IN ('queued', 'running')`, [runId])
  return r.n as number
}

export async function createRun(input: CreateRunInput): Promise<Run> {
  const settings = jobSettings()
  const base: Scenario = scenarioSchema.parse(input.design.scenario)
  const axes = input.kind === 'sweep' ? (input.axes ?? []) : []
  if (input.kind === 'sweep') {
    const problems = axisProblems(base, axes)
    if (input.figure === 'pixelOnAxisGain' && base.emitter.source.shape === 'extended') {
      problems.push('Ranking by the pixel figure needs a disc or rectangle source; this design emits over the whole panel')
    }
    if (problems.length) throw new RunRequestError(problems.join('; '), 400, problems)
  }
  const seed = input.seed ?? base.trace.seed
  const cells: SweepCell[] = input.kind === 'sweep'
    ? expandSweep(base, axes)
    : [{ index: 0, coordinates: [], feasible: true, scenario: base }]
  const feasible = cells.filter((c) => c.feasible)
  if (feasible.length === 0) {
    const reasons = cells.map((c) => (c.feasible ? '' : `cell ${c.index} (${c.coordinates.join(', ')}): ${c.reason}`))
    throw new RunRequestError(`No cell of this sweep can be built: ${reasons[0]}`, 400, reasons)
  }
  const p = input.precision ?? {}
  const targetStdErr = p.targetStdErr ?? null
  const rayCap = targetStdErr !== null ? p.rayCap! : null
  const raysPerCell = targetStdErr === null ? (p.rays ?? base.trace.rays) : null
  // First round: the whole count, or (with a target) one batch to measure the spread from.
  const firstRound = raysPerCell ?? Math.min(settings.batchRays, rayCap!)
  const companion = (c: SweepCell) => (c.feasible && c.scenario.lensArray ? 2 : 1)
  const cost = feasible.reduce((n, c) => n + (raysPerCell ?? rayCap!) * companion(c), 0)
  const planned = feasible.reduce((n, c) => n + firstRound * companion(c), 0)
  // Pilot trace before anything is stored: refuse what no batch could finish, keep warnings for what is costly.
  const verdict = judgeCost(feasible.map((c) => ({ index: c.index, scenario: c.scenario })), seed, settings.batchRays, settings.batchEvents)
  if (verdict.refuse) throw new RunRequestError(verdict.refuse, 422)

  return withTransaction(async (tx, client) => {
    // One creator per team at a time (held to commit), so concurrent requests cannot all pass the check below.
    await client.query(`SELECT pg_advisory_xact_lock(hashtext('lensfield-team-rays'), hashtext($1))`, [input.teamId])
    const outstanding = await teamOutstandingRays(tx, input.teamId)
    if (outstanding + cost > settings.teamRayLimit) {
      throw new RunRequestError(
        `This would queue ${fmtRays(cost)} rays; your team already has ${fmtRays(outstanding)} waiting and the limit is ` +
        `${fmtRays(settings.teamRayLimit)}. Use fewer rays or cells, or wait for running work to finish.`, 429)
    }
    const name = input.name ?? (input.kind === 'sweep'
      ? `${input.design.name}: ${axes.map((a) => AXIS_PARAMETERS[a.parameter].label.toLowerCase()).join(' × ')}`
      : input.design.name)
    const infeasibleCount = cells.length - feasible.length
    const [run] = await tx.insert(runs).values({
      projectId: input.projectId,
      designId: input.design.id,
      designVersion: input.design.version,
      designName: input.design.name,
      kind: input.kind,
      name,
      baseScenario: base,
      axes,
      figure: input.figure ?? 'enhancement',
      seed,
      raysPerCell,
      targetStdErr,
      rayCap,
      batchRays: settings.batchRays,
      raysReserved: cost,
      batchEvents: settings.batchEvents,
      warnings: verdict.warnings,
      cellsTotal: cells.length,
      cellsFinished: infeasibleCount,
      raysPlanned: planned,
      engineVersion: ENGINE_VERSION,
      createdBy: input.userId,
    }).returning()
    const cellRows = await tx.insert(runCells).values(cells.map((c) => ({
      runId: run!.id,
      cellIndex: c.index,
      coordinates: c.coordinates,
      scenario: c.feasible ? c.scenario : null,
      infeasibleReason: c.feasible ? null : c.reason,
      // A single run uses the seed itself, so it reproduces `npm run simulate` with the same seed.
      seed: input.kind === 'single' ? seed : cellSeed(seed, c.index),
      status: c.feasible ? ('queued' as const) : ('infeasible' as const),
      raysPlanned: c.feasible ? firstRound : 0,
    }))).returning({ id: runCells.id, cellIndex: runCells.cellIndex, status: runCells.status })
    const jobs: ReturnType<typeof batchJobs> = []
    const batchRows: Array<typeof runBatches.$inferInsert> = []
    let queuedAhead = await teamQueuedBatches(client, run!.id)
    for (const cell of cellRows) {
      if (cell.status !== 'queued') continue
      const planned = planBatches(0, firstRound, settings.batchRays)
      for (const b of planned) batchRows.push({ cellId: cell.id, ...b })
      jobs.push(...batchJobs(cell.id, planned, queuedAhead))
      queuedAhead += planned.length
    }
    // Inserted in slices: one statement carries at most a few thousand parameters.
    for (let i = 0; i < batchRows.length; i += 500) await tx.insert(runBatches).values(batchRows.slice(i, i + 500))
    await enqueueInTransaction(client, jobs)
    await client.query('SELECT pg_notify($1, $2)', [CHANNEL_PROGRESS, run!.id])
    return run!
  })
}

function fmtRays(n: number): string {
  return n >= 1e9 ? `${(n / 1e9).toPrecision(3)} G` : n >= 1e6 ? `${(n / 1e6).toPrecision(3)} M` : String(n)
}

/** Cancels a queued or running run: open cells and batches are marked cancelled and their jobs withdrawn. */
export async function cancelRun(runId: string): Promise<{ cancelled: boolean; status: Run['status'] }> {
  const result = await withTransaction(async (tx, client) => {
    const [run] = await tx.select().from(runs).where(eq(runs.id, runId)).for('update')
    if (!run) return { cancelled: false, status: 'failed' as const, jobIds: [] as string[] }
    if (run.status !== 'queued' && run.status !== 'running') return { cancelled: false, status: run.status, jobIds: [] }
    const open = await tx.select({ id: runCells.id }).from(runCells)
      .where(and(eq(runCells.runId, runId), inArray(runCells.status, ['queued', 'running'])))
    const openIds = open.map((c) => c.id)
    let jobIds: string[] = []
    if (openIds.length) {
      const b = await tx.update(runBatches).set({ status: 'cancelled' })
        .where(and(inArray(runBatches.cellId, openIds), eq(runBatches.status, 'queued')))
        .returning({ jobId: runBatches.jobId })
      jobIds = b.map((x) => x.jobId)
      await tx.update(runCells).set({ status: 'cancelled', finishedAt: new Date() }).where(inArray(runCells.id, openIds))
    }
    await tx.update(runs).set({
      status: 'cancelled',
      finishedAt: new Date(),
      cellsFinished: sql`${runs.cellsFinished} + ${openIds.length}`,
    }).where(eq(runs.id, runId))
    await client.query('SELECT pg_notify($1, $2), pg_notify($3, $2)', [CHANNEL_PROGRESS, runId, CHANNEL_CANCEL])
    return { cancelled: true, status: 'cancelled' as const, jobIds }
  })
  if (result.jobIds.length) {
    // Withdrawing queued jobs is a courtesy: a job that still starts finds its batch cancelled and does nothing.
    const boss = await useBoss()
    for (let i = 0; i < result.jobIds.length; i += 500) {
      await boss.cancel(QUEUE_BATCH, result.jobIds.slice(i, i + 500)).catch(() => {})
    }
  }
  return { cancelled: result.cancelled, status: result.status }
}

/** The figure a cell is ranked by, from its stored summary. */
export function figureOf(summary: CellSummary | null, figure: string): { value: number; stdErr: number } | null {
  if (!summary) return null
  switch (figure) {
    case 'extraction': return { value: summary.extraction, stdErr: summary.extractionStdErr }
    case 'onAxisLuminance': return { value: summary.onAxisLuminance, stdErr: summary.onAxisLuminanceStdErr }
    case 'pixelOnAxisGain':
      return summary.pixelOnAxisGain === null || summary.pixelOnAxisGain === undefined ? null : { value: summary.pixelOnAxisGain,
        stdErr: summary.pixelOnAxisGainStdErr ?? 0 }
    default: return { value: summary.enhancement, stdErr: summary.enhancementStdErr }
  }
}

export interface CellSummary {
  rays: number
  extraction: number
  extractionStdErr: number
  enhancement: number
  enhancementStdErr: number
  planarExtraction: number
  planarExtractionStdErr: number
  onAxisLuminance: number
  onAxisLuminanceStdErr: number
  halfLuminanceAngleDeg: number | null
  /** Finite-pixel sources only (else null; absent in summaries stored before it existed). */
  pixelOnAxisGain?: number | null
  pixelOnAxisGainStdErr?: number | null
  losses: Record<string, number>
  lossesStdErr: Record<string, number>
}

/** Index of the best finished cell by the run's figure (highest value), or null. */
export function bestCell(cells: Array<Pick<RunCell, 'cellIndex' | 'status' | 'summary'>>, figure: string): number | null {
  let best: number | null = null
  let bestValue = -Infinity
  for (const c of cells) {
    if (c.status !== 'done') continue
    const f = figureOf(c.summary as CellSummary | null, figure)
    if (f && Number.isFinite(f.value) && f.value > bestValue) { bestValue = f.value; best = c.cellIndex }
  }
  return best
}

/** What a progress stream and the run page show: counts, the best cell so far, errors. */
export async function runProgress(runId: string) {
  const pool = usePool()
  const { rows: [run] } = await pool.query(
    `SELECT id, kind, status, figure, cells_total, cells_finished, rays_planned, rays_done, best_cell_index, error,
            started_at, finished_at FROM runs WHERE id = $1`, [runId])
  if (!run) return null
  const { rows: cells } = await pool.query(
    `SELECT cell_index, status, summary, rays_done, error FROM run_cells WHERE run_id = $1 ORDER BY cell_index`, [runId])
  const best = bestCell(cells.map((c) => ({ cellIndex: c.cell_index, status: c.status, summary: c.summary })), run.figure)
  const bestRow = best === null ? null : cells.find((c) => c.cell_index === best)
  const counts: Record<string, number> = {}
  for (const c of cells) counts[c.status] = (counts[c.status] ?? 0) + 1
  return {
    runId: run.id as string,
    kind: run.kind as string,
    status: run.status as string,
    cellsTotal: run.cells_total as number,
    cellsFinished: run.cells_finished as number,
    cellsDone: counts.done ?? 0,
    cellCounts: counts,
    raysPlanned: Number(run.rays_planned),
    raysDone: Number(run.rays_done),
    bestCell: bestRow && best !== null ? { cellIndex: best, figure: run.figure as string, ...figureOf(bestRow.summary, run.figure)! } : null,
    errors: cells.filter((c) => c.error).map((c) => ({ cellIndex: c.cell_index as number, error: c.error as string })).slice(0, 20),
    runError: run.error as string | null,
    startedAt: run.started_at as Date | null,
    finishedAt: run.finished_at as Date | null,
    cells: cells.map((c) => ({
      cellIndex: c.cell_index as number,
      status: c.status as string,
      raysDone: Number(c.rays_done),
      value: figureOf(c.summary, run.figure),
    })),
  }
}
