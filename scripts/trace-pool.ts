// Runs a scenario on a piscina pool over workers/trace (the same task entry the job system uses): fixed-size
// chunks (boundaries independent of the thread count), tallies merged as they arrive (integer counts, so the order
// does not matter). Used by the simulate CLI, the bench and the thread-invariance test.
import { existsSync, statSync } from 'node:fs'
import { dirname, join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import type { Piscina } from 'piscina'
import type { Scenario } from '../shared/types/scenario'
import type { TraceResult } from '../shared/types/result'
import { companionFor, type CompanionMethod, createTally, mergeRunTallies, planChunks, prepareRun, runTalliesFromBuffer, summarize, type RunTallies } from '../shared/optics'
import { createTracePool, TRACE_WORKER_ENV } from '../server/queue/pool'

/** The checkout (the folder with package.json above this file: scripts/ from source, dist/cli/ when bundled). */
function repoRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url))
  while (!existsSync(join(dir, 'package.json')) && dirname(dir) !== dir) dir = dirname(dir)
  return `${dir}/`
}
const root = repoRoot()

/** scripts/build-workers.mjs, loaded by path (it brings esbuild; the bundled CLI keeps it external). */
async function builder(): Promise<typeof import('./build-workers.mjs')> {
  return import(pathToFileURL(`${root}scripts/build-workers.mjs`).href)
}

/**
 * The worker file. By default the bundle dist/workers/trace.mjs, rebuilt first when any source under shared/ or
 * workers/ is newer (one esbuild call, ~0.3 s): a bundled worker runs the hot loop ~1.6× faster than the same
 * TypeScript loaded module by module through tsx in the worker (measured 2026-12-01, 390k vs 235k rays/s), and
 * vitest cannot give workers a TypeScript loader at all. LENSFIELD_TRACE_WORKER=ts uses workers/trace.ts (needs tsx in
 * the parent), LENSFIELD_TRACE_WORKER=<path> a given compiled file (the same variable the server's pool reads;
 * scripts/simulate.mjs sets it after its own staleness check).
 */
export async function prepareWorker(): Promise<string> {
  const forced = process.env[TRACE_WORKER_ENV]
  if (forced === 'ts') return `${root}workers/trace.ts`
  if (forced) return forced
  const built = `${root}dist/workers/trace.mjs`
  const b = await builder()
  if (!existsSync(built) || b.newestSourceMtimeMs() > statSync(built).mtimeMs) await b.buildAtomically(built, b.buildTraceWorker)
  return built
}

/** A pool (server/queue/pool.ts, the job system's own) over the prepared worker. */
export async function createTracePoolReady(threads: number): Promise<Piscina> {
  return createTracePool(threads, await prepareWorker())
}

export interface PoolRunOptions {
  rays: number
  seed: number
  threads: number
  pool?: Piscina
  chunkRays?: number
  /** The planar companion by quadrature (default) or traced on its own stream. */
  companion?: CompanionMethod
  onProgress?: (raysDone: number, raysTotal: number) => void
}

export async function traceOnPool(sc: Scenario, opts: PoolRunOptions): Promise<{ result: TraceResult; tallies: RunTallies }> {
  const pool = opts.pool ?? (await createTracePoolReady(opts.threads))
  const chunks = planChunks(opts.rays, opts.chunkRays)
  // packed here once and sent as scenes: the workers need not validate the scenario again (a cold zod parse costs
  // more than the whole trace of a short run)
  const scenes = prepareRun(sc, { companion: opts.companion })
  const total: RunTallies = { device: createTally(), planar: scenes.planar ? createTally() : null }
  let done = 0
  let flat: ReturnType<typeof companionFor>
  try {
    const tasks = chunks.map(async ([firstRay, rayCount]) => {
      const buf = (await pool.run({ scenes, firstRay, rayCount, seed: opts.seed })) as ArrayBuffer
      mergeRunTallies(total, runTalliesFromBuffer(buf))
      done += rayCount
      opts.onProgress?.(done, opts.rays)
    })
    // the exact flat companion on this (otherwise idle) thread while the workers trace
    flat = companionFor(sc, total)
    await Promise.all(tasks)
  } finally {
    if (!opts.pool) await pool.destroy()
  }
  return { result: summarize(total, opts.seed, sc.trace.fresnel, flat, sc), tallies: total }
}
