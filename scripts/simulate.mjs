// `npm run simulate`: runs the compiled CLI (dist/cli/simulate.mjs, bundled by scripts/build-workers.mjs with the
// trace worker), building both first when missing or older than a source, so a start costs no TypeScript compile.
import { existsSync, readdirSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'

const root = fileURLToPath(new URL('..', import.meta.url))
const cli = `${root}dist/cli/simulate.mjs`
const worker = `${root}dist/workers/trace.mjs`

// The staleness check without loading esbuild (it is imported only to build): mtimes of shared/, workers/ and the CLI sources.
function newestSourceMtimeMs() {
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

const newest = newestSourceMtimeMs()
if (!existsSync(cli) || !existsSync(worker) || statSync(cli).mtimeMs < newest || statSync(worker).mtimeMs < newest) {
  const { buildAll } = await import('./build-workers.mjs')
  await buildAll()
}
process.env.LENSFIELD_TRACE_WORKER ??= worker // checked just now: the pool need not walk the sources again
await import(pathToFileURL(cli).href)
