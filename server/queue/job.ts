// The one job Lensfield queues: trace one ray batch of one cell. Its payload is a zod schema, so the producer
// (run creation, a precision round) and the consumer (the worker loop, the dead-letter handler) agree on it by
// construction; a payload that does not parse is refused by the worker instead of being half-read.
import { z } from 'zod'
import type pg from 'pg'
import { useBoss } from './boss'
import { jobSettings, QUEUE_BATCH, QUEUE_DEAD } from './config'

export const batchJobPayloadSchema = z.object({
  cellId: z.uuid(),
  batchIndex: z.number().int().min(0),
})
export type BatchJobPayload = z.infer<typeof batchJobPayloadSchema>

/** Expiry, retries with backoff and the dead-letter queue of every batch job (and of its queue). */
export function batchJobOptions() {
  const s = jobSettings()
  return {
    expireInSeconds: s.expireSeconds,
    retryLimit: s.retryLimit,
    retryDelay: s.retryDelaySeconds,
    retryBackoff: true,
    deadLetter: QUEUE_DEAD,
  }
}

/** A batch to enqueue: the job id is stored on the batch row, so cancelling can withdraw it. */
export interface QueuedBatch { batchIndex: number; jobId: string }

/**
 * The jobs pg-boss stores for batches of one cell. Fair sharing between teams: a team's n-th waiting batch gets
 * priority −n (`queuedAhead` = the team's batches already waiting), and the queue hands out the highest priority
 * first, so teams are served in turn and a small run is not stuck behind another team's long sweep.
 */
export function batchJobs(cellId: string, batches: QueuedBatch[], queuedAhead = 0) {
  const opts = batchJobOptions()
  return batches.map((b, i) => ({
    id: b.jobId,
    name: QUEUE_BATCH,
    data: batchJobPayloadSchema.parse({ cellId, batchIndex: b.batchIndex }),
    priority: -Math.min(queuedAhead + i, 2 ** 31 - 1),
    ...opts,
  }))
}
export type BatchJob = ReturnType<typeof batchJobs>[number]

/** Inserts the jobs through the caller's transaction client, so they exist exactly when the batch rows do. */
export async function enqueueInTransaction(client: pg.PoolClient, jobs: BatchJob[]): Promise<void> {
  if (jobs.length === 0) return
  const boss = await useBoss()
  await boss.insert(jobs, { db: { executeSql: (text, values) => client.query(text, values) } })
}

/** Withdraws queued jobs (a courtesy: a job that still starts finds its batch cancelled and does nothing). */
export async function withdrawJobs(jobIds: string[]): Promise<void> {
  if (jobIds.length === 0) return
  const boss = await useBoss()
  for (let i = 0; i < jobIds.length; i += 500) {
    await boss.cancel(QUEUE_BATCH, jobIds.slice(i, i + 500)).catch(() => {})
  }
}

/** The consumer's side: the payload as the producer wrote it, or an error naming what is wrong. */
export function readBatchJob(data: unknown): BatchJobPayload {
  const r = batchJobPayloadSchema.safeParse(data)
  if (!r.success) throw new Error(`malformed batch job payload: ${r.error.issues.map((i) => `${i.path.join('.') || 'payload'} ${i.message}`).join('; ')}`)
  return r.data
}
