// Polarisation-tracked Fresnel in the tracer: planar stacks against a per-polarisation quadrature (in a flat stack
// over an ideal-metal mirror s stays s and p stays p, so η = ½(η_s + η_p); Fresnel: Hecht, Optics, ch. 4), and a
// lens device where the polarised and the averaged model must differ.
import { describe, expect, it } from 'vitest'
import { fresnelRp, fresnelRs } from '../../shared/optics/interfaces'
import { T_EXTRACTED, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_TRAPPED, T_UNRESOLVED, T_WAVEGUIDED, traceScenario } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { expectWithinSigma, fraction, integrate, planarStack, traceScene } from './helpers'

const N = 4_000_000

/**
 * η for one polarisation (R = Rs or Rp at every interface) of emitter(nE) | substrate(nS, t, α) | air over a specular
 * mirror Rb: the same geometric series as the averaged quadrature in planar.test.ts, per polarisation.
 */
function planarQuadraturePol(R: (cosI: number, n1: number, n2: number) => number, nE: number, nS: number, rb: number,
  alphaPerUm: number, tUm: number, profile: 'isotropic' | 'lambertian'): number {
  const muMin = Math.sqrt(1 - 1 / (nE * nE))
  return integrate((mu) => {
    const sinS = (nE / nS) * Math.sqrt(1 - mu * mu)
    if (sinS >= 1) return 0
    const muS = Math.sqrt(1 - sinS * sinS)
    const R1 = R(mu, nE, nS), R2 = R(muS, nS, 1)
    const T1 = 1 - R1, T2 = 1 - R2
    const A = Math.exp((-alphaPerUm * tUm) / muS)
    const rbEff = R1 + (T1 * T1 * rb) / (1 - R1 * rb)
    const p = (T1 / (1 - R1 * rb)) * ((A * T2) / (1 - R2 * A * A * rbEff))
    return (profile === 'isotropic' ? 0.5 * (1 + rb) : 2 * mu) * p
  }, muMin, 1)
}

describe('polarised planar stacks vs ½(η_s + η_p) quadrature, 4 M rays, within 4σ', () => {
  it.each([
    ['isotropic', 1.8, 1.5, 0.9, 0, 'isotropic', 601],
    ['Lambertian', 1.8, 1.5, 0.5, 0, 'lambertian', 602],
    ['absorbing substrate, 2 /mm over 100 µm', 1.7, 1.5, 0.8, 2, 'isotropic', 603],
  ] as const)('%s: nE %s, nS %s, Rb %s, α %s /mm, %s — seed %s', (_label, nE, nS, rb, alphaPerMm, profile, seed) => {
    const es = planarQuadraturePol(fresnelRs, nE, nS, rb, alphaPerMm / 1000, 100, profile)
    const ep = planarQuadraturePol(fresnelRp, nE, nS, rb, alphaPerMm / 1000, 100, profile)
    const want = 0.5 * (es + ep)
    const t = traceScene(planarStack({ nE, nS, rb, profile, absorptionPerMm: alphaPerMm, fresnel: 'polarized' }), N, seed)
    const { p, sigma } = fraction(t, T_EXTRACTED)
    expectWithinSigma('polarised extraction', p, want, sigma, 4)
    expect(t[T_EXTRACTED]! + t[T_REFLECTOR]! + t[T_SUBSTRATE]! + t[T_WAVEGUIDED]! + t[T_TRAPPED]! + t[T_UNRESOLVED]!).toBe(t[T_RAYS])
    // for comparison only: the per-encounter (Rs+Rp)/2 model is within a few 0.1 % of ½(η_s+η_p) in a flat stack
    const avgR = (c: number, a: number, b: number) => 0.5 * (fresnelRs(c, a, b) + fresnelRp(c, a, b))
    const averaged = planarQuadraturePol(avgR, nE, nS, rb, alphaPerMm / 1000, 100, profile)
    console.log(`${_label}: polarised ${p.toFixed(5)} ± ${sigma.toFixed(5)}, ½(η_s+η_p) ${want.toFixed(5)}, averaged quadrature ${averaged.toFixed(5)}`)
  })
})

describe('lens device: polarised vs averaged (n 2.0 glass and lens, close-packed hemispheres, Rb 0.95)', () => {
  it('the two models differ by more than 5σ (independent seeds); the difference is reported', () => {
    const input = {
      emitter: { index: 2.0, angularProfile: 'isotropic' as const },
      reflector: { reflectance: 0.95, diffuseFraction: 0 },
      substrate: { index: 2.0, thicknessUm: 100, absorptionPerMm: 0 },
      lensArray: { lattice: 'hexagonal' as const, pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' as const, index: 2.0 },
    }
    const rays = 2_000_000
    const pol = traceScenario(scenarioSchema.parse({ ...input, trace: { fresnel: 'polarized' } }), { rays, seed: 611 })
    const avg = traceScenario(scenarioSchema.parse({ ...input, trace: { fresnel: 'averaged' } }), { rays, seed: 612 })
    expect(pol.fresnel).toBe('polarized')
    expect(avg.fresnel).toBe('averaged')
    const d = pol.extraction - avg.extraction
    const sd = Math.hypot(pol.extractionStdErr, avg.extractionStdErr)
    console.log(`n 2.0 hemispheres, Rb 0.95: polarised ${pol.extraction.toFixed(5)} ± ${pol.extractionStdErr.toFixed(5)}, averaged ${avg.extraction.toFixed(5)} ± ${avg.extractionStdErr.toFixed(5)}, difference ${d.toFixed(5)} ± ${sd.toFixed(5)} (${(d / sd).toFixed(1)} σ)`)
    expect(Math.abs(d) / sd).toBeGreaterThan(5)
  })
})
