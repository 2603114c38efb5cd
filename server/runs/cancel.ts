// Cancelling a queued or running run: open cells and batches are marked cancelled and their jobs withdrawn; workers
// tracing one of its batches hear `lensfield_cancel` and abort their pool tasks.
import { and, eq, inArray, sql } from 'drizzle-orm'
import { runBatches, runCells, runs, type Run } from '../db/schema'
import { CHANNEL_CANCEL } from '../queue/config'
import { withdrawJobs } from '../queue/job'
import { isOpen, notifyProgress, OPEN_STATUSES, withTransaction } from './db'

export async function cancelRun(runId: string): Promise<{ cancelled: boolean; status: Run['status'] }> {
  const result = await withTransaction(async (tx) => {
    const [run] = await tx.select({ status: runs.status }).from(runs).where(eq(runs.id, runId)).for('update')
    if (!run) return { cancelled: false, status: 'failed' as const, jobIds: [] as string[] }
    if (!isOpen(run.status)) return { cancelled: false, status: run.status, jobIds: [] }
    const open = await tx.select({ id: runCells.id }).from(runCells)
      .where(and(eq(runCells.runId, runId), inArray(runCells.status, [...OPEN_STATUSES])))
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
    await notifyProgress(tx, runId)
    await tx.execute(sql`SELECT pg_notify(${CHANNEL_CANCEL}, ${runId})`)
    return { cancelled: true, status: 'cancelled' as const, jobIds }
  })
  await withdrawJobs(result.jobIds)
  return { cancelled: result.cancelled, status: result.status }
}
