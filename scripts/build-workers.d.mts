/** Bundles workers/trace.ts into `outfile` (default dist/workers/trace.mjs); resolves to the written path. */
export function buildTraceWorker(outfile?: string): Promise<string>
