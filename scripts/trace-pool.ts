// Runs a scenario on a piscina pool over workers/trace (the same task entry the job system uses): fixed-size
// chunks (boundaries independent of the thread count), tallies merged as they arrive (integer counts, so the order
// does not matter). Used by the simulate CLI, the bench and the thread-invariance test.
import { existsSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { Piscina } from 'piscina'
import type { Scenario } from '../shared/types/scenario'
import type { TraceResult } from '../shared/types/result'
import { createTally, mergeRunTallies, planChunks, runTalliesFromBuffer, summarize, type RunTallies } from '../shared/optics'

const root = fileURLToPath(new URL('..', import.meta.url))

/**
 * The worker file. Running from TypeScript sources (under tsx, vitest), the TypeScript entry is used: worker
 * threads inherit tsx's loader through execArgv, and it can never be stale. Compiled consumers use the bundle
 * dist/workers/trace.mjs (node scripts/build-workers.mjs). LENSFIELD_WORKER=ts|dist|<path to a .mjs> forces one
 * (vitest cannot give workers a TypeScript loader, so the tests bundle a copy and point here).
 */
export function workerFilename(): string {
  const forced = process.env.LENSFIELD_WORKER
  const built = `${root}dist/workers/trace.mjs`
  if (forced === 'dist') return built
  if (forced && forced !== 'ts') return forced // an explicit path to a compiled worker
  if (forced === 'ts' || import.meta.url.endsWith('.ts') || !existsSync(built)) return `${root}workers/trace.ts`
  return built
}

export function createTracePool(threads: number): Piscina {
  return new Piscina({ filename: workerFilename(), minThreads: threads, maxThreads: threads, idleTimeout: 60_000 })
}

export interface PoolRunOptions {
  rays: number
  seed: number
  threads: number
  pool?: Piscina
  chunkRays?: number
  onProgress?: (raysDone: number, raysTotal: number) => void
}

export async function traceOnPool(sc: Scenario, opts: PoolRunOptions): Promise<{ result: TraceResult; tallies: RunTallies }> {
  const pool = opts.pool ?? createTracePool(opts.threads)
  const chunks = planChunks(opts.rays, opts.chunkRays)
  const total: RunTallies = { device: createTally(), planar: sc.lensArray ? createTally() : null }
  let done = 0
  try {
    await Promise.all(
      chunks.map(async ([firstRay, rayCount]) => {
        const buf = (await pool.run({ scenario: sc, firstRay, rayCount, seed: opts.seed })) as ArrayBuffer
        mergeRunTallies(total, runTalliesFromBuffer(buf))
        done += rayCount
        opts.onProgress?.(done, opts.rays)
      }),
    )
  } finally {
    if (!opts.pool) await pool.destroy()
  }
  return { result: summarize(total, opts.seed), tallies: total }
}
