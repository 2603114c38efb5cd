// Bundles the piscina task entry workers/trace.ts (and the shared core it imports) into dist/workers/trace.mjs,
// a plain ES module that node can load as a worker without a TypeScript loader, and the simulate CLI
// (scripts/simulate.ts) into dist/cli/simulate.mjs, so `npm run simulate` starts without compiling TypeScript.
// piscina (and esbuild, which the CLI loads only to rebuild a stale worker) stay external.
import { existsSync, readdirSync, renameSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'

const root = fileURLToPath(new URL('..', import.meta.url))

// minified: a third of the parse and compile time at every start (zod is most of the bundle); the source map keeps stack traces readable
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', minify: true, keepNames: true, sourcemap: true, logLevel: 'warning' }

/** Bundles the worker into `outfile` (default dist/workers/trace.mjs). */
export async function buildTraceWorker(outfile = `${root}dist/workers/trace.mjs`) {
  const { build } = await import('esbuild') // loaded only to build: a fresh start checks mtimes only
  await build({ ...common, entryPoints: [`${root}workers/trace.ts`], outfile, external: ['piscina'] })
  return outfile
}

/** Bundles the simulate CLI into `outfile` (default dist/cli/simulate.mjs). */
export async function buildSimulateCli(outfile = `${root}dist/cli/simulate.mjs`) {
  const { build } = await import('esbuild')
  await build({ ...common, entryPoints: [`${root}scripts/simulate.ts`], outfile, external: ['piscina', 'esbuild'] })
  return outfile
}

/** Newest modification time (ms) of the sources the compiled files are built from. */
export function newestSourceMtimeMs() {
  let newest = 0
  const walk = (dir) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, e.name)
      if (e.isDirectory()) walk(p)
      else if (/\.(ts|mjs|js)$/.test(e.name)) newest = Math.max(newest, statSync(p).mtimeMs)
    }
  }
  walk(`${root}shared`)
  walk(`${root}workers`)
  for (const f of ['scripts/simulate.ts', 'scripts/trace-pool.ts', 'scripts/build-workers.mjs']) newest = Math.max(newest, statSync(`${root}${f}`).mtimeMs)
  return newest
}

/** `outfile` is missing or older than a source. */
export function isStale(outfile) {
  return !existsSync(outfile) || newestSourceMtimeMs() > statSync(outfile).mtimeMs
}

/** Builds `build(tmp)` beside `outfile` and renames it in place, so a concurrent process never loads a half-written file. */
export async function buildAtomically(outfile, builder) {
  const tmp = `${outfile}.${process.pid}.tmp.mjs`
  await builder(tmp)
  renameSync(tmp, outfile)
  try { renameSync(`${tmp}.map`, `${outfile}.map`) } catch { /* no source map: fine */ }
  return outfile
}

/** Both bundles, each only when missing or stale (`force`: always). */
export async function buildAll({ force = false } = {}) {
  const worker = `${root}dist/workers/trace.mjs`, cli = `${root}dist/cli/simulate.mjs`
  const jobs = []
  if (force || isStale(worker)) jobs.push(buildAtomically(worker, buildTraceWorker))
  if (force || isStale(cli)) jobs.push(buildAtomically(cli, buildSimulateCli))
  await Promise.all(jobs)
  return { worker, cli }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const { worker, cli } = await buildAll({ force: true })
  console.log(`built ${worker}\nbuilt ${cli}`)
}
