// `npm run worker`: an extra worker process on this or another machine. It needs only DATABASE_URL (the same
// database the web server uses); it takes ray batches from the queue until it is stopped (SIGINT/SIGTERM), then
// finishes or hands back what it was tracing.
import { parseArgs } from 'node:util'
import closeWithGrace from 'close-with-grace'
import { stopBoss } from '../server/queue/boss'
import { defaultThreads } from '../server/queue/pool'
import { startBatchWorker } from '../server/queue/worker'
import { isDatabaseUnavailable } from '../server/utils/unavailable'
import { prepareWorker } from './trace-pool'

const { values } = parseArgs({ options: { threads: { type: 'string' }, prefetch: { type: 'string' }, help: { type: 'boolean', short: 'h' } } })
if (values.help) {
  console.log('usage: npm run worker -- [--threads N] [--prefetch N]\n  DATABASE_URL must point at the Lensfield database.\n'
    + '  Threads default to cores − 1 (at least 1), or LENSFIELD_WORKER_THREADS.\n'
    + '  Prefetch: batches held beyond one per thread, so a thread does not wait for a commit (default 0, or LENSFIELD_WORKER_PREFETCH).')
  process.exit(0)
}
if (!process.env.DATABASE_URL) {
  console.error('DATABASE_URL is not set: point it at the Lensfield database, e.g. DATABASE_URL=postgres://user@host:5432/lensfield npm run worker')
  process.exit(2)
}
let threads = defaultThreads()
if (values.threads !== undefined) {
  threads = Number(values.threads)
  if (!Number.isInteger(threads) || threads < 1) {
    console.error(`--threads must be a whole number ≥ 1: got ${values.threads}`)
    process.exit(2)
  }
}

// The queue library settles jobs without awaiting; while the database is away those promises reject. They are
// harmless (the job expires and is retried), so say so and carry on; anything else is a bug: stop.
process.on('unhandledRejection', (err) => {
  if (isDatabaseUnavailable(err)) {
    console.error(`[worker] database unavailable (${(err as Error).message}); waiting for it to return`)
    return
  }
  console.error('[worker] unexpected error:', err)
  process.exit(1)
})

// Run from source: the pool loads the bundle of workers/trace.ts, rebuilt here when sources are newer.
process.env.LENSFIELD_TRACE_WORKER = await prepareWorker()
let prefetch: number | undefined
if (values.prefetch !== undefined) {
  prefetch = Number(values.prefetch)
  if (!Number.isInteger(prefetch) || prefetch < 0) {
    console.error(`--prefetch must be a whole number ≥ 0: got ${values.prefetch}`)
    process.exit(2)
  }
}
const worker = await startBatchWorker({ threads, prefetch })
console.log(`[worker] ${worker.name} tracing on ${worker.threads} thread(s), prefetch ${worker.prefetch}; Ctrl-C to stop`)
// On a signal (or an uncaught error) finish or hand back the running batches, then stop; a second signal, or 60 s,
// ends at once (the queue retries what was left). Unhandled rejections are handled above, not a reason to stop.
closeWithGrace({ delay: 60_000, skip: ['unhandledRejection'] }, async ({ signal, err }) => {
  if (err) console.error('[worker] unexpected error:', err)
  console.log(`[worker] ${signal ?? 'stopping'}: finishing running batches`)
  await worker.stop()
  await stopBoss()
})
