// Bundles the piscina task entry workers/trace.ts (and the shared core it imports) into dist/workers/trace.mjs,
// a plain ES module that node can load as a worker without a TypeScript loader. piscina stays external.
import { build } from 'esbuild'
import { fileURLToPath } from 'node:url'

const root = fileURLToPath(new URL('..', import.meta.url))

/** Bundles the worker into `outfile` (default dist/workers/trace.mjs). */
export async function buildTraceWorker(outfile = `${root}dist/workers/trace.mjs`) {
  await build({
  entryPoints: [`${root}workers/trace.ts`],
  outfile,
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  external: ['piscina'],
  sourcemap: true,
  logLevel: 'warning',
  })
  return outfile
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  console.log(`built ${await buildTraceWorker()}`)
}
