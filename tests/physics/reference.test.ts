// The fast tracer against a plain second implementation of the same model (tests/physics/reference-tracer.ts):
// extraction and loss channels must agree within 5σ of the difference of two independent binomial estimates
// (common practice).
import { describe, it } from 'vitest'
import { scenarioSchema } from '../../shared/types/scenario'
import { T_EXTRACTED, T_RAYS, T_REFLECTOR, T_WAVEGUIDED } from '../../shared/optics'
import { expectWithinSigma, traceScene } from './helpers'
import { referenceTrace } from './reference-tracer'

const cases = [
  { name: 'close-packed hexagonal hemispheres (the issue example)', nE: 1.7, nS: 1.5, rb: 0.8, fd: 0, tUm: 100, lattice: 'hexagonal' as const, pitchUm: 10, diameterUm: 10, sagUm: 5, seed: 1501 },
  { name: 'sparse square shallow caps, diffuse reflector', nE: 1.8, nS: 1.5, rb: 0.9, fd: 0.5, tUm: 30, lattice: 'square' as const, pitchUm: 20, diameterUm: 14, sagUm: 2.5, seed: 1502 },
  { name: 'hexagonal, D < pitch, tall caps, thin substrate', nE: 1.6, nS: 1.6, rb: 0.95, fd: 0, tUm: 5, lattice: 'hexagonal' as const, pitchUm: 8, diameterUm: 7, sagUm: 3.5, seed: 1503, rays: 15_000 },
]

describe('fast tracer vs plain reference implementation', () => {
  it.each(cases)('$name — seed $seed', (c) => {
    const N: number = ('rays' in c ? c.rays : undefined) ?? 40_000 // the plain search is slow where grazing rays cross many cells
    const ref = referenceTrace(c, N, c.seed)
    const sc = scenarioSchema.parse({
      emitter: { index: c.nE }, reflector: { reflectance: c.rb, diffuseFraction: c.fd }, substrate: { index: c.nS, thicknessUm: c.tUm },
      lensArray: { lattice: c.lattice, pitchUm: c.pitchUm, diameterUm: c.diameterUm, sagUm: c.sagUm },
    })
    const fast = traceScene(sc, 200_000, c.seed)
    const n = fast[T_RAYS]!
    for (const [label, slot, refCount] of [['extracted', T_EXTRACTED, ref.extracted], ['reflector', T_REFLECTOR, ref.reflector], ['waveguided', T_WAVEGUIDED, ref.waveguided]] as const) {
      const pf = fast[slot]! / n, pr = refCount / N
      const sigma = Math.sqrt(pf * (1 - pf) / n + pr * (1 - pr) / N) || 1e-12
      expectWithinSigma(label, pf, pr, sigma)
    }
  })
})
