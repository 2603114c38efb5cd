// The piscina pool that runs the tracing core off the main thread. The task entry is workers/trace.ts; piscina
// needs a JavaScript file: the production build carries one at .output/server/workers/trace.mjs (the build hook in
// nuxt.config.ts), and runs from source point LENSFIELD_TRACE_WORKER at the bundle in dist/workers/.
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { Piscina } from 'piscina'

/** Threads for tracing: cores − 1 (one core stays for the web server and the database), at least 1. */
export function defaultThreads(): number {
  const env = Number(process.env.LENSFIELD_WORKER_THREADS)
  if (Number.isInteger(env) && env >= 1) return env
  return Math.max(1, availableParallelism() - 1)
}

/**
 * The compiled trace worker: LENSFIELD_TRACE_WORKER when set (`npm run worker`, `npm run dev` and the bench set it
 * to the bundle that scripts/trace-pool.ts keeps up to date in dist/workers/), else the production build's copy
 * beside the server entry (`node .output/server/index.mjs` → .output/server/workers/trace.mjs).
 */
export function resolveTraceWorker(): string {
  const fromEnv = process.env.LENSFIELD_TRACE_WORKER
  if (fromEnv) {
    if (!existsSync(fromEnv)) throw new Error(`LENSFIELD_TRACE_WORKER points at ${fromEnv}, which does not exist`)
    return resolve(fromEnv)
  }
  const entryScript = process.argv[1] ? resolve(process.argv[1]) : ''
  const beside = join(dirname(entryScript), 'workers', 'trace.mjs')
  if (entryScript && existsSync(beside)) return beside
  throw new Error('No compiled trace worker: run the production build (node .output/server/index.mjs), or set '
    + 'LENSFIELD_TRACE_WORKER to a bundle of workers/trace.ts (npm run worker and npm run dev do this).')
}

export async function createTracePool(threads = defaultThreads()): Promise<Piscina> {
  const filename = resolveTraceWorker()
  return new Piscina({
    filename,
    minThreads: threads,
    maxThreads: threads,
    // Tasks wait in the pool's queue rather than in ours; ray chunks are small and many.
    maxQueue: 'auto',
    idleTimeout: 60_000,
  })
}
