// `npm run simulate`: runs the compiled CLI (dist/cli/simulate.mjs, bundled by scripts/build-workers.mjs with the
// trace worker), building both first when missing or older than a source, so a start costs no TypeScript compile.
import { existsSync, statSync } from 'node:fs'
import { fileURLToPath, pathToFileURL } from 'node:url'
import { buildAll, newestSourceMtimeMs } from './build-workers.mjs'

const root = fileURLToPath(new URL('..', import.meta.url))
const cli = `${root}dist/cli/simulate.mjs`
const worker = `${root}dist/workers/trace.mjs`

// The staleness check: build-workers.mjs imports esbuild only inside its build functions, so this loads no builder.
const newest = newestSourceMtimeMs()
if (!existsSync(cli) || !existsSync(worker) || statSync(cli).mtimeMs < newest || statSync(worker).mtimeMs < newest) {
  await buildAll()
}
process.env.LENSFIELD_TRACE_WORKER ??= worker // checked just now: the pool need not walk the sources again
await import(pathToFileURL(cli).href)
