// The batch worker loop: takes ray batches from the queue, traces each on the piscina pool in the core's fixed
// chunks, and hands the counts to the run domain (server/runs/commit.ts), which merges them under row locks and
// marks the batch done in the same transaction, so a batch retried after its worker died (pg-boss expiry) or
// delivered twice is counted once. Cancellation arrives as NOTIFY and aborts the run's running pool tasks.
import { hostname } from 'node:os'
import type { Piscina } from 'piscina'
import { createTally, mergeRunTallies, runTalliesFromBuffer, CHUNK_RAYS, type CompanionMethod, type RunTallies } from '../../shared/optics'
import { commitBatch, failBatch, recordBatchError, startBatch } from '../runs/commit'
import { chunkEventBudget } from '../runs/cost'
import { useBoss } from './boss'
import { CHANNEL_CANCEL, jobSettings, QUEUE_BATCH, QUEUE_DEAD } from './config'
import { readBatchJob, type BatchJobPayload } from './job'
import { listen } from './listen'
import { createTracePool, defaultThreads } from './pool'

export interface BatchWorker {
  name: string
  threads: number
  prefetch: number
  /** Stops taking jobs, waits up to graceMs for running batches, then aborts what is left (it is retried). */
  stop(graceMs?: number): Promise<void>
}

class Cancelled extends Error {}
/** A batch that ran past its time: failed once, never retried (the same rays would take as long again). */
class TooSlow extends Error {}

/** Traces one batch on the pool; chunk boundaries follow the core's fixed chunking, so results never depend on it. */
async function traceBatch(pool: Piscina, scenario: unknown, firstRay: number, rayCount: number, seed: number,
  budget: { batchEvents: number | null; batchRays: number }, signal: AbortSignal, companion?: CompanionMethod): Promise<RunTallies> {
  const tasks: Array<Promise<ArrayBuffer>> = []
  for (let first = firstRay; first < firstRay + rayCount; first += CHUNK_RAYS) {
    const count = Math.min(CHUNK_RAYS, firstRay + rayCount - first)
    const eventBudget = chunkEventBudget(budget.batchEvents, budget.batchRays, count)
    tasks.push(pool.run({ scenario, firstRay: first, rayCount: count, seed, eventBudget, companion }, { signal }))
  }
  const bufs = await Promise.all(tasks)
  let total: RunTallies | null = null
  for (const b of bufs) {
    const t = runTalliesFromBuffer(b)
    if (!total) total = { device: createTally(), planar: t.planar ? createTally() : null }
    mergeRunTallies(total, t)
  }
  return total!
}

/**
 * Starts a worker in this process: `threads` queue subscriptions feeding one pool of `threads` threads.
 * `companion: 'traced'` traces the planar companion of every lens cell beside it (the way runs were traced before the
 * quadrature companion; the commit keeps a traced companion's counts and summarises with them). Only
 * bench/scale-out.ts sets it, to time today's sweep against that one; the default is the engine's own rule.
 */
export async function startBatchWorker(opts: { threads?: number; prefetch?: number; companion?: CompanionMethod } = {}): Promise<BatchWorker> {
  const threads = opts.threads ?? defaultThreads()
  // Extra subscriptions beyond one per thread: each holds one more batch, whose chunks wait in the pool's queue while
  // the batch before it commits, so a thread does not idle through a commit and the next fetch.
  const prefetch = opts.prefetch ?? jobSettings().prefetch
  const settings = jobSettings()
  const name = `${hostname()}:${process.pid}`
  const pool = createTracePool(threads)
  const boss = await useBoss()
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

  const handle = async (data: BatchJobPayload, expireInSeconds: number) => {
    const row = await startBatch(data.cellId, data.batchIndex, name)
    if (!row) return { skipped: true }
    const runId = row.runId

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
      const tallies = await traceBatch(pool, row.scenario, row.firstRay, row.rayCount, row.seed,
        { batchEvents: row.batchEvents, batchRays: row.batchRays }, ac.signal, opts.companion)
      await commitBatch(data.cellId, data.batchIndex, tallies, performance.now() - t0, name)
      return { rays: row.rayCount }
    } catch (err) {
      if (ac.signal.reason instanceof Cancelled) return { cancelled: true }
      if (ac.signal.reason instanceof TooSlow) {
        const why = ac.signal.reason.message
        await recordBatchError(data.cellId, data.batchIndex, why).catch(() => {})
        await failBatch(data.cellId, data.batchIndex, why)
        return { failed: why }
      }
      const message = err instanceof Error ? err.message : String(err)
      await recordBatchError(data.cellId, data.batchIndex, message).catch(() => {})
      throw err
    } finally {
      clearTimeout(timer)
      set.delete(ac)
      if (set.size === 0) active.delete(runId)
    }
  }

  const workIds: string[] = []
  for (let i = 0; i < threads + prefetch; i++) {
    let workId = ''
    workId = await boss.work(QUEUE_BATCH, { batchSize: 1, pollingIntervalSeconds: settings.pollingSeconds },
      async ([job]) => {
        const r = await track(handle(readBatchJob(job!.data), job!.expireInSeconds))
        // pg-boss would otherwise pause a polling interval before fetching again; while batches are waiting,
        // go straight on to the next one.
        if (workId) boss.notifyWorker(workId)
        return r
      })
    workIds.push(workId)
  }
  workIds.push(await boss.work(QUEUE_DEAD, { batchSize: 1, pollingIntervalSeconds: 2 }, async ([job]) => {
    const data = readBatchJob(job!.data)
    await failBatch(data.cellId, data.batchIndex, 'retries used up')
  }))

  return {
    name,
    threads,
    prefetch,
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
