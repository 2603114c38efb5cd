// Committing a traced batch, in four steps inside one transaction: lock (run, then cell, then batch: the one lock
// order everywhere), merge (the batch's integer counts into the cell's, the batch marked done in the same
// transaction, so a retried or duplicated job counts once), finish the cell (its summary, or with a precision
// target another round of batches), finish the run (once every cell has finished: done or failed, and the best
// cell by the run's figure). Every change ends with a progress NOTIFY; the sweep-finished mail goes out after commit.
import { randomUUID } from 'node:crypto'
import { and, count, eq, max, sql } from 'drizzle-orm'
import type pg from 'pg'
import { createTally, mergeRunTallies, summarizeStored, type RunTallies } from '../../shared/optics'
import { ENGINE_VERSION } from '../../shared/optics/version'
import { bestCellIndex, cellSummaryOf } from '../../shared/types/figures'
import type { Scenario } from '../../shared/types/scenario'
import { projects, runBatches, runCells, runs } from '../db/schema'
import { useDb } from '../utils/db'
import { batchJobs, enqueueInTransaction, withdrawJobs } from '../queue/job'
import { teamQueuedBatches } from './create'
import { isOpen, notifyProgress, tallyFromBytes, tallyToBytes, withTransaction, type TxDb } from './db'
import { reportRunClosed } from './mail'
import { nextRound, planBatches, tracedRaysPerRay } from './plan'

/** The rows of one batch under lock, or null when any is gone. */
async function lockBatch(tx: TxDb, cellId: string, batchIndex: number) {
  const [ref] = await tx.select({ runId: runCells.runId, teamId: projects.teamId }).from(runCells)
    .innerJoin(runs, eq(runs.id, runCells.runId)).innerJoin(projects, eq(projects.id, runs.projectId))
    .where(eq(runCells.id, cellId))
  if (!ref) return null
  const [run] = await tx.select({
    status: runs.status, targetStdErr: runs.targetStdErr, rayCap: runs.rayCap, batchRays: runs.batchRays,
  }).from(runs).where(eq(runs.id, ref.runId)).for('update')
  const [cell] = await tx.select({
    status: runCells.status, seed: runCells.seed, raysPlanned: runCells.raysPlanned, raysDone: runCells.raysDone,
    deviceTally: runCells.deviceTally, planarTally: runCells.planarTally, scenario: runCells.scenario,
  }).from(runCells).where(eq(runCells.id, cellId)).for('update')
  const [batch] = await tx.select({
    status: runBatches.status, rayCount: runBatches.rayCount, attempts: runBatches.attempts, error: runBatches.error,
  }).from(runBatches).where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex))).for('update')
  if (!run || !cell || !batch) return null
  return { runId: ref.runId, teamId: ref.teamId, run, cell, batch }
}
type Locked = NonNullable<Awaited<ReturnType<typeof lockBatch>>>

/** The cell's stored counts with the batch's added (pure: a fresh tally when nothing was stored yet). */
export function mergeIntoStored(stored: { deviceTally: Buffer | null; planarTally: Buffer | null }, batch: RunTallies): RunTallies {
  const merged: RunTallies = {
    device: tallyFromBytes(stored.deviceTally) ?? createTally(),
    planar: batch.planar ? (tallyFromBytes(stored.planarTally) ?? createTally()) : null,
  }
  mergeRunTallies(merged, batch)
  return merged
}

/**
 * The cell's planned rays are all traced: store its summary, or (precision target not met) plan another round.
 * Returns the user's rays added and whether the cell finished.
 */
async function finishCell(tx: TxDb, client: pg.PoolClient, cellId: string,
  l: Locked, tallies: RunTallies, raysDone: number): Promise<{ finished: boolean; addedRays: number }> {
  const result = summarizeStored(tallies, l.cell.seed, l.cell.scenario)
  const verdict = nextRound({ raysDone, stdErr: result.extractionStdErr, targetStdErr: l.run.targetStdErr, rayCap: l.run.rayCap })
  if (!verdict.done) {
    const [{ m } = { m: -1 }] = await tx.select({ m: max(runBatches.batchIndex) }).from(runBatches).where(eq(runBatches.cellId, cellId))
    const planned = planBatches(l.cell.raysPlanned, verdict.addRays, l.run.batchRays, (m ?? -1) + 1)
      .map((b) => ({ ...b, jobId: randomUUID() }))
    await tx.insert(runBatches).values(planned.map((b) => ({ cellId, ...b })))
    await enqueueInTransaction(client, batchJobs(cellId, planned, await teamQueuedBatches(tx, l.teamId)))
    await tx.update(runCells).set({ raysPlanned: sql`${runCells.raysPlanned} + ${verdict.addRays}` }).where(eq(runCells.id, cellId))
    return { finished: false, addedRays: verdict.addRays }
  }
  await tx.update(runCells).set({
    status: 'done', summary: cellSummaryOf(result), stopReason: verdict.stopReason, finishedAt: new Date(), engineVersion: ENGINE_VERSION,
  }).where(eq(runCells.id, cellId))
  return { finished: true, addedRays: 0 }
}

/**
 * Marks the run done (or failed when no cell finished) once every cell has finished. Call inside the run lock.
 * Returns true when this call closed the run (the caller reports it after its transaction commits).
 */
async function finishRunIfComplete(tx: TxDb, runId: string): Promise<boolean> {
  const [run] = await tx.select({ status: runs.status, figure: runs.figure, cellsTotal: runs.cellsTotal, cellsFinished: runs.cellsFinished })
    .from(runs).where(eq(runs.id, runId))
  if (!run || !isOpen(run.status) || run.cellsFinished < run.cellsTotal) return false
  const cells = await tx.select({ cellIndex: runCells.cellIndex, status: runCells.status, summary: runCells.summary })
    .from(runCells).where(eq(runCells.runId, runId))
  const anyDone = cells.some((c) => c.status === 'done')
  await tx.update(runs).set({
    status: anyDone ? 'done' : 'failed',
    bestCellIndex: bestCellIndex(cells, run.figure),
    finishedAt: new Date(),
    ...(anyDone ? {} : { error: 'every cell failed; see the cells for the reasons' }),
  }).where(eq(runs.id, runId))
  return true
}

/** Adds one traced batch to its cell; returns false when the batch was already counted or the run ended. */
export async function commitBatch(cellId: string, batchIndex: number, tallies: RunTallies, computeMs: number, worker: string): Promise<boolean> {
  let closedRun: string | null = null
  const counted = await withTransaction(async (tx, client) => {
    const l = await lockBatch(tx, cellId, batchIndex)
    if (!l || l.batch.status !== 'queued' || !isOpen(l.cell.status) || !isOpen(l.run.status)) return false
    const merged = mergeIntoStored(l.cell, tallies)
    const raysDone = l.cell.raysDone + l.batch.rayCount
    const ms = Math.round(computeMs)
    await tx.update(runBatches).set({ status: 'done', computeMs: ms, worker, completedAt: new Date() })
      .where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex)))
    await tx.update(runCells).set({
      status: 'running', deviceTally: tallyToBytes(merged.device), planarTally: tallyToBytes(merged.planar), raysDone,
      computeMs: sql`${runCells.computeMs} + ${ms}`,
    }).where(eq(runCells.id, cellId))
    const [{ n: remaining } = { n: 0 }] = await tx.select({ n: count() }).from(runBatches)
      .where(and(eq(runBatches.cellId, cellId), eq(runBatches.status, 'queued')))
    const cell = remaining === 0 ? await finishCell(tx, client, cellId, l, merged, raysDone) : { finished: false, addedRays: 0 }
    // runs.rays_* count traced rays (the unit of the team's ray limit); cells count the user's.
    const perRay = tracedRaysPerRay(l.cell.scenario as Scenario)
    await tx.update(runs).set({
      raysDone: sql`${runs.raysDone} + ${l.batch.rayCount * perRay}`,
      raysPlanned: sql`${runs.raysPlanned} + ${cell.addedRays * perRay}`,
      cellsFinished: sql`${runs.cellsFinished} + ${cell.finished ? 1 : 0}`,
    }).where(eq(runs.id, l.runId))
    if (cell.finished && await finishRunIfComplete(tx, l.runId)) closedRun = l.runId
    await notifyProgress(tx, l.runId)
    return true
  })
  if (closedRun) reportRunClosed(closedRun)
  return counted
}

/** A batch that used up its retries (or ran too long): its cell fails with the last error, the run goes on without it. */
export async function failBatch(cellId: string, batchIndex: number, reason: string): Promise<void> {
  let closedRun: string | null = null
  const withdrawn = await withTransaction(async (tx) => {
    const l = await lockBatch(tx, cellId, batchIndex)
    if (!l || l.batch.status !== 'queued') return []
    const why = l.batch.error ?? reason
    await tx.update(runBatches).set({ status: 'failed' }).where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex)))
    const others = await tx.update(runBatches).set({ status: 'cancelled' })
      .where(and(eq(runBatches.cellId, cellId), eq(runBatches.status, 'queued'))).returning({ jobId: runBatches.jobId })
    if (isOpen(l.cell.status) && isOpen(l.run.status)) {
      await tx.update(runCells).set({
        status: 'failed', finishedAt: new Date(), error: `batch ${batchIndex} failed after ${l.batch.attempts} attempt(s): ${why}`,
      }).where(eq(runCells.id, cellId))
      await tx.update(runs).set({ cellsFinished: sql`${runs.cellsFinished} + 1` }).where(eq(runs.id, l.runId))
      if (await finishRunIfComplete(tx, l.runId)) closedRun = l.runId
    }
    await notifyProgress(tx, l.runId)
    return others.map((o) => o.jobId)
  })
  if (closedRun) reportRunClosed(closedRun)
  await withdrawJobs(withdrawn)
}

/** What a worker needs to trace a batch, or null when the batch, its cell or its run is no longer open. */
export async function startBatch(cellId: string, batchIndex: number, worker: string) {
  const db = useDb()
  const [row] = await db.select({
    batchStatus: runBatches.status, firstRay: runBatches.firstRay, rayCount: runBatches.rayCount, runId: runCells.runId,
    cellStatus: runCells.status, scenario: runCells.scenario, seed: runCells.seed, runStatus: runs.status,
    batchEvents: runs.batchEvents, batchRays: runs.batchRays,
  }).from(runBatches).innerJoin(runCells, eq(runCells.id, runBatches.cellId)).innerJoin(runs, eq(runs.id, runCells.runId))
    .where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex)))
  if (!row || row.batchStatus !== 'queued' || !isOpen(row.cellStatus) || !isOpen(row.runStatus)) return null
  await db.update(runBatches).set({ attempts: sql`${runBatches.attempts} + 1`, worker })
    .where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex)))
  const cellStarted = await db.update(runCells).set({ status: 'running', startedAt: sql`COALESCE(${runCells.startedAt}, now())` })
    .where(and(eq(runCells.id, cellId), eq(runCells.status, 'queued'))).returning({ id: runCells.id })
  const runStarted = await db.update(runs).set({ status: 'running', startedAt: sql`COALESCE(${runs.startedAt}, now())` })
    .where(and(eq(runs.id, row.runId), eq(runs.status, 'queued'))).returning({ id: runs.id })
  if (cellStarted.length + runStarted.length > 0) await notifyProgress(db, row.runId)
  return row
}

/** Keeps the last error a worker met on a batch (shown when its retries are used up). */
export async function recordBatchError(cellId: string, batchIndex: number, message: string): Promise<void> {
  await useDb().update(runBatches).set({ error: message.slice(0, 500) })
    .where(and(eq(runBatches.cellId, cellId), eq(runBatches.batchIndex, batchIndex)))
}
