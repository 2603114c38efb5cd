/** Bundles workers/trace.ts into `outfile` (default dist/workers/trace.mjs); resolves to the written path. */
export function buildTraceWorker(outfile?: string): Promise<string>
/** Bundles scripts/simulate.ts into `outfile` (default dist/cli/simulate.mjs); resolves to the written path. */
export function buildSimulateCli(outfile?: string): Promise<string>
/** Newest modification time (ms) of the sources the bundles are built from. */
export function newestSourceMtimeMs(): number
/** `outfile` is missing or older than a source. */
export function isStale(outfile: string): boolean
/** Builds beside `outfile` and renames it in place. */
export function buildAtomically(outfile: string, builder: (tmp: string) => Promise<string>): Promise<string>
/** Both bundles, each only when missing or stale. */
export function buildAll(opts?: { force?: boolean }): Promise<{ worker: string; cli: string }>
