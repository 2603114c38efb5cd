// Creating a run or sweep: plan it (./plan, pure), pilot-trace its cost (./cost), then store run, cells and
// batches and enqueue the batch jobs in one transaction, so a crash leaves either the whole run or nothing.
import { rayLimitMessage, tracedPerRay } from '../../shared/types/ray-limits'
import { randomUUID } from 'node:crypto'
import { and, count, eq, inArray, sql } from 'drizzle-orm'
import { ENGINE_VERSION } from '../../shared/optics/version'
import { scenarioSchema, type Scenario } from '../../shared/types/scenario'
import type { Figure } from '../../shared/types/figures'
import type { SweepAxis } from '../../shared/types/sweep'
import { projects, runBatches, runCells, runs, type Run } from '../db/schema'
import { jobSettings } from '../queue/config'
import { batchJobs, enqueueInTransaction, type BatchJob } from '../queue/job'
import { judgeCost } from './cost'
import { notifyProgress, OPEN_STATUSES, withTransaction, type TxDb } from './db'
import { planRun, RunRequestError, type PrecisionInput } from './plan'

export interface CreateRunInput {
  kind: 'single' | 'sweep'
  projectId: string
  teamId: string
  design: { id: string; name: string; version: number; scenario: unknown }
  userId: string
  name?: string
  seed?: number
  precision?: PrecisionInput
  axes?: SweepAxis[]
  figure?: Figure
}

/**
 * Traced rays the team still has waiting in queued or running runs: what each run reserved (a precision run its ray
 * cap), less what it has traced.
 */
async function teamOutstandingRays(tx: TxDb, teamId: string): Promise<number> {
  const [r] = await tx.select({
    n: sql<string>`COALESCE(SUM(GREATEST(COALESCE(${runs.raysReserved}, ${runs.raysPlanned}) - ${runs.raysDone}, 0)), 0)::bigint`,
  }).from(runs).innerJoin(projects, eq(projects.id, runs.projectId))
    .where(and(eq(projects.teamId, teamId), inArray(runs.status, [...OPEN_STATUSES])))
  return Number(r?.n ?? 0)
}

/** Batches waiting in the queue for the team (the fair-sharing priority counts from it). */
export async function teamQueuedBatches(tx: TxDb, teamId: string): Promise<number> {
  const [r] = await tx.select({ n: count() }).from(runBatches)
    .innerJoin(runCells, eq(runCells.id, runBatches.cellId))
    .innerJoin(runs, eq(runs.id, runCells.runId))
    .innerJoin(projects, eq(projects.id, runs.projectId))
    .where(and(eq(projects.teamId, teamId), eq(runBatches.status, 'queued'), inArray(runs.status, [...OPEN_STATUSES])))
  return r?.n ?? 0
}

export async function createRun(input: CreateRunInput): Promise<Run> {
  const settings = jobSettings()
  const base: Scenario = scenarioSchema.parse(input.design.scenario)
  const plan = planRun({
    kind: input.kind, base, designName: input.design.name, axes: input.axes, figure: input.figure, name: input.name,
    seed: input.seed, precision: input.precision, batchRays: settings.batchRays, at: new Date(),
  })
  // Pilot trace before anything is stored: refuse what no batch could finish, keep warnings for what is costly.
  const verdict = judgeCost(plan.feasible, plan.seed, settings.batchRays, settings.batchEvents)
  if (verdict.refuse) throw new RunRequestError(verdict.refuse, 422)

  return withTransaction(async (tx, client) => {
    // One creator per team at a time (held to commit), so concurrent requests cannot all pass the check below.
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext('lensfield-team-rays'), hashtext(${input.teamId}))`)
    const outstanding = await teamOutstandingRays(tx, input.teamId)
    const cost = plan.tracedRaysReserved
    if (outstanding + cost > settings.teamRayLimit) {
      const tracedPerCellRay = plan.feasible.reduce((n, c) => n + tracedPerRay(c.scenario), 0)
      throw new RunRequestError(
        rayLimitMessage(plan.raysPerCell ?? plan.rayCap!, plan.feasible.length, tracedPerCellRay, outstanding, settings.teamRayLimit), 429)
    }
    const [run] = await tx.insert(runs).values({
      projectId: input.projectId,
      designId: input.design.id,
      designVersion: input.design.version,
      designName: input.design.name,
      kind: input.kind,
      name: plan.name,
      baseScenario: base,
      axes: plan.axes,
      figure: plan.figure,
      seed: plan.seed,
      raysPerCell: plan.raysPerCell,
      targetStdErr: plan.targetStdErr,
      rayCap: plan.rayCap,
      batchRays: settings.batchRays,
      raysReserved: cost,
      batchEvents: settings.batchEvents,
      warnings: verdict.warnings,
      cellsTotal: plan.cells.length,
      cellsFinished: plan.infeasibleCount,
      raysPlanned: plan.tracedRaysPlanned,
      engineVersion: ENGINE_VERSION,
      createdBy: input.userId,
    }).returning()
    const cellRows = await tx.insert(runCells).values(plan.cells.map((c) => ({
      runId: run!.id,
      cellIndex: c.index,
      coordinates: c.coordinates,
      scenario: c.scenario,
      infeasibleReason: c.infeasibleReason,
      seed: c.seed,
      status: c.scenario ? ('queued' as const) : ('infeasible' as const),
      raysPlanned: c.raysPlanned,
    }))).returning({ id: runCells.id, cellIndex: runCells.cellIndex })
    const idOf = new Map(cellRows.map((c) => [c.cellIndex, c.id]))
    const jobs: BatchJob[] = []
    const batchRows: Array<typeof runBatches.$inferInsert> = []
    let queuedAhead = await teamQueuedBatches(tx, input.teamId)
    for (const cell of plan.cells) {
      if (!cell.batches.length) continue
      const cellId = idOf.get(cell.index)!
      const withJobs = cell.batches.map((b) => ({ ...b, jobId: randomUUID() }))
      for (const b of withJobs) batchRows.push({ cellId, ...b })
      jobs.push(...batchJobs(cellId, withJobs, queuedAhead))
      queuedAhead += withJobs.length
    }
    // Inserted in slices: one statement carries at most a few thousand parameters.
    for (let i = 0; i < batchRows.length; i += 500) await tx.insert(runBatches).values(batchRows.slice(i, i + 500))
    await enqueueInTransaction(client, jobs)
    await notifyProgress(tx, run!.id)
    return run!
  })
}
