// Determinism: results depend only on (scenario, rays, seed) — identical bitwise for any chunking and any thread
// count of the real piscina pool (common practice for reproducible Monte Carlo); sampling checks by χ².
import { beforeAll, describe, expect, it } from 'vitest'
import { fileURLToPath } from 'node:url'
import { buildTraceWorker } from '../../scripts/build-workers.mjs'
import { scenarioSchema } from '../../shared/types/scenario'
import {
  buildProfileTable, createRngState, createTally, mergeTally, nextUniform, packScene, sampleIsotropic, sampleLambertian,
  sampleTabulated, seedRay, traceRange, traceScenario, runTalliesFromBuffer, runTalliesToBuffer, prepareRun, traceChunk,
} from '../../shared/optics'
import { createTracePoolReady, traceOnPool } from '../../scripts/trace-pool'

const sc = scenarioSchema.parse({
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0.2 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0.3 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
})

describe('chunking and thread-count invariance', () => {
  beforeAll(async () => {
    // vitest cannot lend worker threads a TypeScript loader: bundle the real task entry for the real pool
    const out = fileURLToPath(new URL('../../test-output/workers/trace.mjs', import.meta.url))
    process.env.LENSFIELD_TRACE_WORKER = await buildTraceWorker(out)
  })
  it('any split of the ray range, merged in any order, gives the same tally — seed 1101', () => {
    const scene = packScene(sc)
    const whole = createTally()
    traceRange(scene, 0, 30_000, 1101, whole)
    const parts = [[20_000, 10_000], [0, 7_000], [7_000, 13_000]] as const
    const merged = createTally()
    for (const [f, c] of parts) { const t = createTally(); traceRange(scene, f, c, 1101, t); mergeTally(merged, t) }
    expect(Array.from(merged)).toEqual(Array.from(whole))
  })
  it('the run buffer round-trips', () => {
    const t = traceChunk(prepareRun(sc, { companion: 'traced' }), 0, 2000, 5)
    const back = runTalliesFromBuffer(runTalliesToBuffer(t))
    expect(Array.from(back.device)).toEqual(Array.from(t.device))
    expect(Array.from(back.planar!)).toEqual(Array.from(t.planar!))
  })
  it('in-process, pool of 1 and pool of 2 threads give identical results (chunks of 20 000) — seed 1102', async () => {
    const rays = 150_000
    const local = traceScenario(sc, { rays, seed: 1102 })
    const results = []
    for (const threads of [1, 2]) {
      const pool = await createTracePoolReady(threads)
      try {
        results.push((await traceOnPool(sc, { rays, seed: 1102, threads, pool, chunkRays: 20_000 })).result)
      } finally {
        await pool.destroy()
      }
    }
    // traceScenario uses the default chunk size: chunk boundaries must not matter either
    expect(results[0]).toEqual(local)
    expect(results[1]).toEqual(local)
    expect(local.enhancementStdErr).toBeGreaterThan(0)
  })
})

function chi2Uniform(counts: number[]): number {
  const n = counts.reduce((a, c) => a + c, 0), e = n / counts.length
  return counts.reduce((a, c) => a + (c - e) ** 2 / e, 0)
}
const limit = (dof: number) => dof + 5 * Math.sqrt(2 * dof)

describe('sampled directions (χ² against the intended densities, 5σ of the χ² distribution)', () => {
  const N = 200_000, B = 50
  const st = createRngState()
  const v = new Float64Array(3)
  it('isotropic: μ uniform on [−1, 1] and φ uniform — seed 1201', () => {
    const mu = new Array(B).fill(0), phi = new Array(B).fill(0)
    let worst = 0
    for (let i = 0; i < N; i++) {
      seedRay(st, 1201, 0, i)
      sampleIsotropic(nextUniform(st), nextUniform(st), v)
      mu[Math.min(B - 1, Math.floor(((v[2]! + 1) / 2) * B))]++
      phi[Math.min(B - 1, Math.floor(((Math.atan2(v[1]!, v[0]!) + Math.PI) / (2 * Math.PI)) * B))]++
      worst = Math.max(worst, Math.abs(Math.hypot(v[0]!, v[1]!, v[2]!) - 1))
    }
    expect(worst).toBeLessThan(1e-12)
    expect(chi2Uniform(mu)).toBeLessThan(limit(B - 1))
    expect(chi2Uniform(phi)).toBeLessThan(limit(B - 1))
  })
  it('Lambertian: μ² uniform on [0, 1] (pdf 2μ) — seed 1202', () => {
    const m2 = new Array(B).fill(0)
    for (let i = 0; i < N; i++) {
      seedRay(st, 1202, 0, i)
      sampleLambertian(nextUniform(st), nextUniform(st), v)
      m2[Math.min(B - 1, Math.floor(v[2]! * v[2]! * B))]++
    }
    expect(chi2Uniform(m2)).toBeLessThan(limit(B - 1))
  })
  it('tabulated I(θ) = 1 − θ/90° on [0°, 90°]: bin probabilities ∫ I sinθ dθ — seed 1203', () => {
    const table = buildProfileTable([[0, 1], [90, 0]])
    const counts = new Array(18).fill(0)
    for (let i = 0; i < N; i++) {
      seedRay(st, 1203, 0, i)
      sampleTabulated(table, 0, nextUniform(st), nextUniform(st), nextUniform(st), v)
      counts[Math.min(17, Math.floor((Math.acos(v[2]!) * 180) / Math.PI / 5))]++
    }
    // ∫ (1 − θ/θm) sinθ dθ = [−cosθ + (θ cosθ − sinθ)/θm]
    const thm = Math.PI / 2
    const F = (t: number) => -Math.cos(t) + (t * Math.cos(t) - Math.sin(t)) / thm
    const total = F(thm) - F(0)
    let chi2 = 0
    for (let k = 0; k < 18; k++) {
      const e = (N * (F(((k + 1) * 5 * Math.PI) / 180) - F((k * 5 * Math.PI) / 180))) / total
      chi2 += (counts[k] - e) ** 2 / e
    }
    expect(chi2).toBeLessThan(limit(17))
  })
})
