// A run's state as a progress stream and the run page show it: status, cells, the best cell so far by the run's
// figure, errors, and rays counted in the user's rays (a cell's own rays; the planar companion traced beside each
// is the engine's business), with the start time so the page can estimate the time left.
import { asc, eq } from 'drizzle-orm'
import { bestCellIndex, figureOf } from '../../shared/types/figures'
import { runCells, runs } from '../db/schema'
import { useDb } from '../utils/db'

export async function runProgress(runId: string) {
  const db = useDb()
  const [run] = await db.select({
    id: runs.id, kind: runs.kind, status: runs.status, figure: runs.figure, cellsTotal: runs.cellsTotal,
    cellsFinished: runs.cellsFinished, error: runs.error, startedAt: runs.startedAt, finishedAt: runs.finishedAt,
  }).from(runs).where(eq(runs.id, runId))
  if (!run) return null
  const cells = await db.select({
    cellIndex: runCells.cellIndex, status: runCells.status, summary: runCells.summary, raysPlanned: runCells.raysPlanned,
    raysDone: runCells.raysDone, error: runCells.error,
  }).from(runCells).where(eq(runCells.runId, runId)).orderBy(asc(runCells.cellIndex))
  const best = bestCellIndex(cells, run.figure)
  const bestRow = best === null ? null : cells.find((c) => c.cellIndex === best)
  const bestValue = bestRow ? figureOf(bestRow.summary, run.figure) : null
  const counts: Record<string, number> = {}
  let raysPlanned = 0, raysDone = 0
  for (const c of cells) {
    counts[c.status] = (counts[c.status] ?? 0) + 1
    raysPlanned += c.raysPlanned
    raysDone += c.raysDone
  }
  return {
    runId: run.id,
    kind: run.kind,
    status: run.status,
    cellsTotal: run.cellsTotal,
    cellsFinished: run.cellsFinished,
    cellsDone: counts.done ?? 0,
    cellCounts: counts,
    /** The user's rays: planned so far (a precision run plans round by round) and traced. */
    raysPlanned,
    raysDone,
    bestCell: best !== null && bestValue ? { cellIndex: best, figure: run.figure, ...bestValue } : null,
    errors: cells.filter((c) => c.error).map((c) => ({ cellIndex: c.cellIndex, error: c.error! })).slice(0, 20),
    runError: run.error,
    startedAt: run.startedAt,
    finishedAt: run.finishedAt,
    cells: cells.map((c) => ({
      cellIndex: c.cellIndex,
      status: c.status,
      raysDone: c.raysDone,
      value: figureOf(c.summary, run.figure),
    })),
  }
}
export type RunProgressState = NonNullable<Awaited<ReturnType<typeof runProgress>>>
