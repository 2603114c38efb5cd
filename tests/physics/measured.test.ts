// Lens shape "measured": a spherical cap sampled into a profile table and traced through the monotone interpolant
// must give the analytic cap's extraction within K_SIGMA·σ (independent seeds, σ of the difference of two
// binomial estimates); a sampled cap of another sag is a control the same check must tell apart.
// Cap geometry: h(ρ) = √(Rc² − ρ²) − (Rc − h), Rc = (a² + h²)/(2h) (standard spherical-cap geometry).
import { describe, expect, it } from 'vitest'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import { traceScenario } from '../../shared/optics'
import { K_SIGMA } from './helpers'

function sampledSphere(diameterUm: number, sagUm: number, rows: number): Array<[number, number]> {
  const a = diameterUm / 2, Rc = (a * a + sagUm * sagUm) / (2 * sagUm)
  return Array.from({ length: rows }, (_, i) => {
    const r = (a * i) / (rows - 1)
    return [r, Math.max(0, Math.sqrt(Rc * Rc - r * r) - (Rc - sagUm))] as [number, number]
  })
}

const base: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 3, shape: 'spherical', index: 1.5 },
  trace: { rays: 1000000, seed: 1, fresnel: 'averaged' },
}
const lens = base.lensArray as Record<string, unknown>

describe('measured lens shape', () => {
  const analytic = traceScenario(scenarioSchema.parse(base), { rays: 400_000, seed: 811 })

  it('a sampled spherical cap (D 10 µm, sag 3 µm, 101 rows) matches the analytic cap within K_SIGMA·σ — seeds 811/812', () => {
    const measured = scenarioSchema.parse({ ...base, lensArray: { ...lens, shape: 'measured', profile: sampledSphere(10, 3, 101) } })
    const r = traceScenario(measured, { rays: 400_000, seed: 812 })
    const sigma = Math.hypot(r.extractionStdErr, analytic.extractionStdErr)
    expect(Math.abs(r.extraction - analytic.extraction)).toBeLessThan(K_SIGMA * sigma)
    expect(r.losses.unresolved).toBeLessThan(1e-3)
  })

  it('control: a sampled cap of sag 1.5 µm traced as measured is told apart from the sag-3 analytic cap — seed 813', () => {
    const other = scenarioSchema.parse({ ...base, lensArray: { ...lens, sagUm: 1.5, shape: 'measured', profile: sampledSphere(10, 1.5, 101) } })
    const r = traceScenario(other, { rays: 150_000, seed: 813 })
    expect(Math.abs(r.extraction - analytic.extraction)).toBeGreaterThan(K_SIGMA * Math.hypot(r.extractionStdErr, analytic.extractionStdErr))
  })

  it('the schema refuses a measured shape without a profile and a profile that rises towards the rim', () => {
    expect(scenarioSchema.safeParse({ ...base, lensArray: { ...lens, shape: 'measured' } }).success).toBe(false)
    const rising = scenarioSchema.safeParse({ ...base, lensArray: { ...lens, shape: 'measured', profile: [[0, 3], [2, 3.1], [5, 0]] } })
    expect(rising.success).toBe(false)
  })
})
