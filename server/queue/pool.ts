// The piscina pool that runs the tracing core off the main thread: the one place a trace pool is made, for the
// job system, the CLI, the bench and the thread-invariance test alike. The task entry is workers/trace.ts; piscina
// needs a JavaScript file, named by one setting, LENSFIELD_TRACE_WORKER: the production build carries one at
// .output/server/workers/trace.mjs (the build hook in nuxt.config.ts) and uses it when the variable is unset; runs
// from source set it to the bundle that scripts/trace-pool.ts keeps up to date in dist/workers/.
import { existsSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { Piscina } from 'piscina'

export const TRACE_WORKER_ENV = 'LENSFIELD_TRACE_WORKER'

/** Threads for tracing: LENSFIELD_WORKER_THREADS, else cores − 1 (one core stays for the web server and the database), at least 1. */
export function defaultThreads(): number {
  const env = Number(process.env.LENSFIELD_WORKER_THREADS)
  if (Number.isInteger(env) && env >= 1) return env
  return Math.max(1, availableParallelism() - 1)
}

/**
 * The compiled trace worker: LENSFIELD_TRACE_WORKER when set (`npm run worker`, `npm run dev`, the CLI and the bench
 * set it through scripts/trace-pool.ts), else the production build's copy beside the server entry
 * (`node .output/server/index.mjs` → .output/server/workers/trace.mjs).
 */
export function resolveTraceWorker(): string {
  const fromEnv = process.env[TRACE_WORKER_ENV]
  if (fromEnv) {
    if (!existsSync(fromEnv)) throw new Error(`${TRACE_WORKER_ENV} points at ${fromEnv}, which does not exist`)
    return resolve(fromEnv)
  }
  const entryScript = process.argv[1] ? resolve(process.argv[1]) : ''
  const beside = join(dirname(entryScript), 'workers', 'trace.mjs')
  if (entryScript && existsSync(beside)) return beside
  throw new Error('No compiled trace worker: run the production build (node .output/server/index.mjs), or set '
    + `${TRACE_WORKER_ENV} to a bundle of workers/trace.ts (npm run worker and npm run dev do this).`)
}

/**
 * A pool of `threads` threads over the trace worker. Tasks wait in the pool's own (unbounded) queue: ray chunks are
 * small and many, and a batch hands all of its chunks over at once.
 */
export function createTracePool(threads = defaultThreads(), filename = resolveTraceWorker()): Piscina {
  return new Piscina({ filename, minThreads: threads, maxThreads: threads, idleTimeout: 60_000 })
}
