// Runs a scenario on a piscina pool over workers/trace (the same task entry the job system uses): fixed-size
// chunks (boundaries independent of the thread count), tallies merged as they arrive (integer counts, so the order
// does not matter). Used by the simulate CLI, the bench and the thread-invariance test.
import { existsSync, readdirSync, renameSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { Piscina } from 'piscina'
import type { Scenario } from '../shared/types/scenario'
import type { TraceResult } from '../shared/types/result'
import { createTally, mergeRunTallies, planChunks, runTalliesFromBuffer, summarize, type RunTallies } from '../shared/optics'

const root = fileURLToPath(new URL('..', import.meta.url))

/**
 * The worker file. By default the bundle dist/workers/trace.mjs, rebuilt first when any source under shared/ or
 * workers/ is newer (one esbuild call, ~0.3 s): a bundled worker runs the hot loop ~1.6× faster than the same
 * TypeScript loaded module by module through tsx in the worker (measured 2026-12-01, 390k vs 235k rays/s), and
 * vitest cannot give workers a TypeScript loader at all. LENSFIELD_WORKER=ts uses workers/trace.ts (needs tsx in
 * the parent), LENSFIELD_WORKER=<path> a given compiled file.
 */
export async function prepareWorker(): Promise<string> {
  const forced = process.env.LENSFIELD_WORKER
  if (forced === 'ts') return `${root}workers/trace.ts`
  if (forced) return forced
  const built = `${root}dist/workers/trace.mjs`
  if (!existsSync(built) || newestSourceMtimeMs() > statSync(built).mtimeMs) {
    const { buildTraceWorker } = await import('./build-workers.mjs')
    // written beside and renamed, so a concurrent CLI never loads a half-written file
    const tmp = `${built}.${process.pid}.tmp.mjs`
    await buildTraceWorker(tmp)
    renameSync(tmp, built)
    try { renameSync(`${tmp}.map`, `${built}.map`) } catch { /* no source map: fine */ }
  }
  return built
}

function newestSourceMtimeMs(): number {
  let newest = 0
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name)
      if (e.isDirectory()) walk(p)
      else if (/\.(ts|mjs|js)$/.test(e.name)) newest = Math.max(newest, statSync(p).mtimeMs)
    }
  }
  walk(`${root}shared`)
  walk(`${root}workers`)
  return newest
}

/** The worker file last prepared (prepareWorker), else the TypeScript entry. */
let preparedWorker: string | null = null
export function workerFilename(): string {
  return preparedWorker ?? process.env.LENSFIELD_WORKER ?? `${root}workers/trace.ts`
}

/** A pool over the prepared worker (call prepareWorker first; createTracePoolReady does both). */
export function createTracePool(threads: number): Piscina {
  return new Piscina({ filename: workerFilename(), minThreads: threads, maxThreads: threads, idleTimeout: 60_000 })
}

export async function createTracePoolReady(threads: number): Promise<Piscina> {
  preparedWorker = await prepareWorker()
  return createTracePool(threads)
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
  const pool = opts.pool ?? (await createTracePoolReady(opts.threads))
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
  return { result: summarize(total, opts.seed, sc.trace.fresnel, sc), tallies: total }
}
