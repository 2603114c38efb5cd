// The embedded worker: the web server also traces queued batches, so `npm start` alone runs sweeps. Set
// LENSFIELD_EMBEDDED_WORKER=0 to serve pages only (when dedicated `npm run worker` machines do the tracing).
// Nitro's close hook stops taking jobs, lets running batches finish for a while, then closes the queue.
import { stopBoss } from '../queue/boss'
import { startBatchWorker, type BatchWorker } from '../queue/worker'
import { closeProgressRelay } from '../utils/progress'

export default defineNitroPlugin((nitroApp) => {
  if (!process.env.DATABASE_URL) return
  const embedded = process.env.LENSFIELD_EMBEDDED_WORKER !== '0'
  let worker: Promise<BatchWorker | null> = Promise.resolve(null)
  if (embedded) {
    worker = startBatchWorker().then((w) => {
      console.log(`[worker] embedded worker ${w.name} tracing on ${w.threads} thread(s)`)
      return w
    }).catch((err) => {
      // The site stays up without it; the queue keeps the batches until a worker can take them.
      console.error('[worker] embedded worker did not start:', err instanceof Error ? err.message : err)
      return null
    })
  }
  nitroApp.hooks.hook('close', async () => {
    const w = await worker
    await w?.stop()
    await closeProgressRelay()
    await stopBoss()
  })
})
