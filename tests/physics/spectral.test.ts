// Spectral runs with every index constant must reproduce the monochromatic result within σ (the wavelength then
// touches nothing); a dispersive stack follows its index at each wavelength.
import { describe, expect, it } from 'vitest'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import { traceScenario } from '../../shared/optics'
import { expectWithinSigma } from './helpers'

const lensExample: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic' },
  reflector: { reflectance: 0.8 },
  substrate: { index: 1.5, thicknessUm: 100 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
}

describe('spectral with constant indices = monochromatic', () => {
  it.each([['averaged', 701, 702], ['polarized', 703, 704]] as const)('hex hemispheres, Gaussian 530/60 nm vs no spectrum, %s — seeds %s, %s', (fresnel, s1, s2) => {
    const mono = traceScenario(scenarioSchema.parse({ ...lensExample, trace: { fresnel } }), { rays: 600_000, seed: s1 })
    const spec = traceScenario(scenarioSchema.parse({ ...lensExample, emitter: { ...lensExample.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } },
      trace: { fresnel } }), { rays: 600_000, seed: s2 })
    expectWithinSigma('extraction', spec.extraction, mono.extraction, Math.hypot(spec.extractionStdErr, mono.extractionStdErr))
    // without a spectrum the flat companion is the quadrature (exact); with one it is traced (the flat device's colour
    // comes from its counts) and agrees with the exact value within its σ
    expect(mono.planar.method).toBe('quadrature')
    expect(spec.planar.method).toBe('traced')
    expectWithinSigma('planar extraction', spec.planar.extraction, mono.planar.extraction, spec.planar.extractionStdErr)
  })
  it('planar 1.7 | 1.5 | air, Rb 0.8, averaged, table spectrum: 0.1678 (the quadrature value listed in planar.test.ts) — seed 705', () => {
    const r = traceScenario(scenarioSchema.parse({ ...lensExample, lensArray: null, emitter: { ...lensExample.emitter, spectrum: { table: [[450, 1], [550, 0.3],
      [650, 0.8]] } } }), { rays: 600_000, seed: 705 })
    expectWithinSigma('extraction', r.extraction, 0.1678, Math.hypot(r.extractionStdErr, 5e-5))
  })
})

describe('a dispersive stack follows its index', () => {
  it('planar, no Fresnel, isotropic in an index-matched Cauchy stack: 1 − cos θc(λ) averaged over two lines (escape cone, Greenham, Friend & Bradley, Adv. Mater. 6, 491 (1994); from memory) — seed 706', () => {
    // A 1.5, B 0.02 µm²: n(450) = 1.5988, n(650) = 1.5473; an equal-power two-line table of 1 nm lines
    const cauchy = { cauchy: { A: 1.5, B: 0.02, C: 0 } }
    const lines = { table: [[449.5, 1], [450.5, 1], [451, 0], [649, 0], [649.5, 1], [650.5, 1]] as Array<[number, number]> }
    const r = traceScenario(scenarioSchema.parse({ emitter: { index: cauchy, angularProfile: 'isotropic', spectrum: lines }, reflector: { reflectance: 1 }, substrate: { index: cauchy, thicknessUm: 10 }, lensArray: null, trace: { fresnel: 'none' } }), { rays: 400_000, seed: 706 })
    const cone = (nm: number) => { const n = 1.5 + 0.02 / (nm / 1000) ** 2; return 1 - Math.sqrt(1 - 1 / (n * n)) }
    // the lines' power is spread over ±0.5 nm (and the ramps of the table): the cone varies < 1e-5 over that
    const want = 0.5 * (cone(450) + cone(650))
    expectWithinSigma('extraction', r.extraction, want, Math.hypot(r.extractionStdErr, 2e-4))
    expect(Math.abs(cone(450) - cone(650))).toBeGreaterThan(20 * r.extractionStdErr) // the check sees the dispersion
  })
})
