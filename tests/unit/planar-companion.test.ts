// The planar companion's angular profile in the result (the flat-device overlay of every result page): it must be
// the companion's own counts, consistent with its extraction, and for a planar design identical to the device's.
import { describe, expect, it } from 'vitest'
import { companionFor, createTally, flatCompanion, prepareRun, traceScenario, tracesCompanion } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'

const stack = {
  emitter: { index: 1.7 }, reflector: { reflectance: 0.8 }, substrate: { index: 1.5, thicknessUm: 100 },
  trace: { rays: 40_000, seed: 5 },
}

describe('planar companion profile (seed 5)', () => {
  it('integrates to the companion extraction over the 1° bins (ΔΩ = 2π(cosθa − cosθb)), not to the device', () => {
    const r = traceScenario(scenarioSchema.parse({ ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } }))
    let sum = 0
    r.planar.perSteradian.forEach((v, b) => { sum += v * 2 * Math.PI * (Math.cos((b * Math.PI) / 180) - Math.cos(((b + 1) * Math.PI) / 180)) })
    expect(Math.abs(sum - r.planar.extraction)).toBeLessThan(1e-12)
    expect(Math.abs(sum - r.extraction)).toBeGreaterThan(0.05)
    expect(r.planar.perSteradianStdErr).toHaveLength(90)
    expect(r.planar.luminanceRelative).toHaveLength(90)
  })

  it('is the device itself for a planar design', () => {
    const r = traceScenario(scenarioSchema.parse({ ...stack, lensArray: null }))
    expect(r.planar.perSteradian).toEqual(r.intensity.perSteradian)
    expect(r.planar.luminanceRelative).toEqual(r.luminance.relative)
  })
})

describe('which runs trace the companion (ray accounting) and what summarize gets instead', () => {
  const lens = { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } as const
  it('lenses with an extended source: quadrature, no companion rays; a finite pixel or --companion traced: traced; planar: none', () => {
    expect(tracesCompanion(scenarioSchema.parse({ ...stack, lensArray: lens }))).toBe(false)
    expect(tracesCompanion(scenarioSchema.parse({ ...stack, lensArray: lens }), 'traced')).toBe(true)
    expect(tracesCompanion(scenarioSchema.parse({ ...stack, emitter: { index: 1.7, source: { shape: 'rectangle', widthUm: 30, heightUm: 20 } }, lensArray: lens }))).toBe(true)
    expect(tracesCompanion(scenarioSchema.parse({ ...stack, lensArray: null }), 'traced')).toBe(false)
    expect(prepareRun(scenarioSchema.parse({ ...stack, lensArray: lens })).planar).toBeNull()
  })
  it('companionFor: the quadrature block for a stored lens scenario without a companion tally; null with one, for a planar design or an invalid scenario', () => {
    const sc = scenarioSchema.parse({ ...stack, lensArray: lens })
    const none = { device: createTally(), planar: null }
    expect(companionFor(sc, none)?.method).toBe('quadrature')
    expect(companionFor(JSON.parse(JSON.stringify(sc)), none)?.extraction).toBe(flatCompanion(sc)!.extraction)
    expect(companionFor(sc, { device: createTally(), planar: createTally() })).toBeNull()
    expect(companionFor({ ...sc, lensArray: null }, none)).toBeNull()
    expect(companionFor({ emitter: 'glass' }, none)).toBeNull()
  })
})
