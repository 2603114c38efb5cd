// pg-boss in Lensfield's own database (schema `pgboss`): one queue of ray batches with expiry, retries with
// backoff and a dead-letter queue, all set explicitly so a lost worker or a poisoned batch has a known fate.
import PgBoss from 'pg-boss'
import { jobSettings, QUEUE_BATCH, QUEUE_DEAD } from './config'
import { batchJobOptions } from './job'

let started: Promise<PgBoss> | undefined

async function ensureQueue(boss: PgBoss, name: string, options: PgBoss.Queue) {
  if (await boss.getQueue(name)) return boss.updateQueue(name, options)
  try {
    await boss.createQueue(name, options)
  } catch (err) {
    // Another process (web server and a worker starting together) may have created it a moment ago.
    if (!(await boss.getQueue(name))) throw err
  }
}

/** Starts (once per process) pg-boss on DATABASE_URL and makes sure both queues exist. */
export function useBoss(): Promise<PgBoss> {
  started ??= (async () => {
    const connectionString = process.env.DATABASE_URL
    if (!connectionString) throw new Error('DATABASE_URL is not set')
    const s = jobSettings()
    const boss = new PgBoss({
      connectionString,
      schema: 'pgboss',
      max: 4,
      application_name: 'lensfield-queue',
      maintenanceIntervalSeconds: s.maintenanceSeconds,
      // Keep finished jobs a day for diagnosis; our own tables hold the results.
      deleteAfterDays: 1,
    })
    boss.on('error', (err) => console.error('[queue]', err.message))
    await boss.start()
    // Dead letters first: a queue can only name a dead-letter queue that exists.
    await ensureQueue(boss, QUEUE_DEAD, { name: QUEUE_DEAD, retryLimit: 0 })
    await ensureQueue(boss, QUEUE_BATCH, { name: QUEUE_BATCH, ...batchJobOptions() })
    return boss
  })()
  started.catch(() => { started = undefined })
  return started
}

export async function stopBoss(): Promise<void> {
  if (!started) return
  const boss = await started.catch(() => undefined)
  started = undefined
  await boss?.stop({ graceful: true, wait: true, timeout: 10_000 })
}
