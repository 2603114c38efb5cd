// The piscina pool that runs the tracing core off the main thread. The task entry is workers/trace.ts; piscina
// needs a JavaScript file, so the production build carries a compiled copy at .output/server/workers/trace.mjs
// (written by the build hook in nuxt.config.ts), and development and the stand-alone worker compile it on first use
// with esbuild into node_modules/.cache. LENSFIELD_TRACE_WORKER points at another compiled file.
import { createHash } from 'node:crypto'
import { existsSync, mkdirSync, readdirSync, renameSync, statSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import { Piscina } from 'piscina'

/** Threads for tracing: cores − 1 (one core stays for the web server and the database), at least 1. */
export function defaultThreads(): number {
  const env = Number(process.env.LENSFIELD_WORKER_THREADS)
  if (Number.isInteger(env) && env >= 1) return env
  return Math.max(1, availableParallelism() - 1)
}

/** Bundles workers/trace.ts with esbuild (development and the stand-alone worker run from source). */
export async function compileTraceWorker(repoRoot: string, outFile: string): Promise<string> {
  const entry = join(repoRoot, 'workers', 'trace.ts')
  const esbuild = await import('esbuild')
  mkdirSync(dirname(outFile), { recursive: true })
  // Written beside and renamed, so a second process never loads a half-written file.
  const tmp = `${outFile}.${process.pid}.tmp.mjs`
  await esbuild.build({
    entryPoints: [entry],
    outfile: tmp,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // piscina is resolved from node_modules at run time (its worker plumbing must be the pool's own copy).
    external: ['piscina'],
    logLevel: 'warning',
  })
  renameSync(tmp, outFile)
  return outFile
}

function newestMtime(dir: string): number {
  // The core is small: a walk of shared/ and workers/ decides whether the cached bundle is stale.
  let newest = 0
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name)
    if (entry.isDirectory()) newest = Math.max(newest, newestMtime(p))
    else if (p.endsWith('.ts')) newest = Math.max(newest, statSync(p).mtimeMs)
  }
  return newest
}

/** Finds (or, from source, compiles) the trace worker and returns its absolute path. */
export async function resolveTraceWorker(): Promise<string> {
  const fromEnv = process.env.LENSFIELD_TRACE_WORKER
  if (fromEnv) {
    if (!existsSync(fromEnv)) throw new Error(`LENSFIELD_TRACE_WORKER points at ${fromEnv}, which does not exist`)
    return resolve(fromEnv)
  }
  // Production: `node .output/server/index.mjs` → .output/server/workers/trace.mjs.
  const entryScript = process.argv[1] ? resolve(process.argv[1]) : ''
  const beside = join(dirname(entryScript), 'workers', 'trace.mjs')
  if (entryScript && existsSync(beside)) return beside
  // From source: find the repository root (the folder holding workers/trace.ts) from the working directory.
  let root = process.cwd()
  while (!existsSync(join(root, 'workers', 'trace.ts'))) {
    const up = dirname(root)
    if (up === root) throw new Error('cannot find the trace worker: neither .output/server/workers/trace.mjs nor workers/trace.ts')
    root = up
  }
  // One bundle per checkout (git worktrees may share node_modules), named by a hash of the checkout's path.
  const tag = createHash('sha256').update(root).digest('hex').slice(0, 12)
  const out = join(root, 'node_modules', '.cache', 'lensfield', `trace-${tag}.mjs`)
  const srcTime = Math.max(newestMtime(join(root, 'shared')), newestMtime(join(root, 'workers')))
  if (!existsSync(out) || statSync(out).mtimeMs < srcTime) await compileTraceWorker(root, out)
  return out
}

export async function createTracePool(threads = defaultThreads()): Promise<Piscina> {
  const filename = await resolveTraceWorker()
  return new Piscina({
    filename,
    minThreads: threads,
    maxThreads: threads,
    // Tasks wait in the pool's queue rather than in ours; ray chunks are small and many.
    maxQueue: 'auto',
    idleTimeout: 60_000,
  })
}
