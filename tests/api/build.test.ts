// The production build must carry the trace worker as plain JS beside the server entry, loadable by piscina
// without any TypeScript loader, and it must compute exactly what the core computes in-process.
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import { prepareRun, TALLY_LENGTH, traceChunk } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { repoRoot } from '../../scripts/postgres'
import { validScenario } from './client'

describe('production build', () => {
  it('has .output/server/workers/trace.mjs, and piscina runs it to the in-process result (seed 3)', async () => {
    const file = join(repoRoot, '.output', 'server', 'workers', 'trace.mjs')
    expect(existsSync(file)).toBe(true)
    // piscina as the built server loads it (.output/server/node_modules), the copy the worker file imports too.
    const { Piscina } = createRequire(join(repoRoot, '.output', 'server', 'index.mjs'))('piscina') as typeof import('piscina')
    const pool = new Piscina({ filename: file, minThreads: 1, maxThreads: 1 })
    try {
      const scenario = scenarioSchema.parse(validScenario)
      const buf: ArrayBuffer = await pool.run({ scenario, firstRay: 1000, rayCount: 5000, seed: 3 })
      const got = new Float64Array(buf)
      // the planar companion comes from quadrature: the buffer holds the device tally only
      expect(got.length).toBe(TALLY_LENGTH)
      const want = traceChunk(prepareRun(scenario), 1000, 5000, 3)
      expect(Array.from(got)).toEqual(Array.from(want.device))
    } finally {
      await pool.destroy()
    }
  })
})
