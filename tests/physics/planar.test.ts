// Planar stacks against closed forms and a 1-D quadrature (escape cone 1 − cos θc: Greenham, Friend & Bradley, Adv. Mater. 6, 491 (1994), the formula from
// memory;
// Fresnel coefficients: Hecht, Optics, ch. 4).
import { describe, expect, it } from 'vitest'
import { fresnelAveraged } from '../../shared/optics/interfaces'
import {
  THETA_BINS, T_EXTRACTED, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED, T_UNRESOLVED, T_WAVEGUIDED, traceScenario,
} from '../../shared/optics'
import { expectWithinSigma, fraction, integrate, planarStack, traceScene } from './helpers'

const N = 300_000

/**
 * η for a planar stack emitter(nE) | substrate(nS, t, α) | air over a specular mirror Rb, averaged Fresnel.
 * Per emission cosine μ in the emitter (upward, after the down-going half met the mirror: weight ½(1+Rb) for an
 * isotropic source): P = T1/(1 − R1·Rb) · A·T2/(1 − R2·A²·Rb,eff), the geometric series of multiple reflections,
 * with A = exp(−α t/μs) one substrate pass and Rb,eff = R1 + T1²·Rb/(1 − R1·Rb) the reflectance seen from the
 * substrate (Fresnel: Hecht, Optics, ch. 4; the series and its extension by absorption derived here).
 */
function planarQuadrature(nE: number, nS: number, rb: number, alphaPerUm: number, tUm: number, fresnel: boolean, profile: 'isotropic' | 'lambertian'): number {
  const muMin = Math.sqrt(1 - 1 / (nE * nE)) // escape cone into air, in the emitter
  return integrate((mu) => {
    const sinE = Math.sqrt(1 - mu * mu)
    const sinS = (nE / nS) * sinE
    if (sinS >= 1) return 0
    const muS = Math.sqrt(1 - sinS * sinS)
    const R1 = fresnel ? fresnelAveraged(mu, nE, nS) : 0
    const R2 = fresnel ? fresnelAveraged(muS, nS, 1) : 0
    const T1 = 1 - R1, T2 = 1 - R2
    const A = Math.exp((-alphaPerUm * tUm) / muS)
    const rbEff = R1 + (T1 * T1 * rb) / (1 - R1 * rb)
    const p = (T1 / (1 - R1 * rb)) * ((A * T2) / (1 - R2 * A * A * rbEff))
    const w = profile === 'isotropic' ? 0.5 * (1 + rb) : 2 * mu // pdf over μ of the upward direction
    return w * p
  }, muMin, 1)
}

describe('planar closed forms (no Fresnel)', () => {
  it('isotropic, ideal mirror: 1 − cos θc = 0.2546 (n 1.5) and 0.1913 (n 1.7) (Greenham, Friend & Bradley, Adv. Mater. 6, 491 (1994); from memory) — seed 101', () => {
    for (const [n, want] of [[1.5, 0.2546], [1.7, 0.1913]] as const) {
      const t = traceScene(planarStack({ nE: n, nS: n, fresnel: 'none' }), N, 101)
      const { p, sigma } = fraction(t, T_EXTRACTED)
      expectWithinSigma(`escape cone n ${n}`, p, want, Math.hypot(sigma, 5e-5)) // 5e-5: rounding of the 4-figure value
    }
  })
  it('Lambertian: sin²θc = 1/n² = 0.4444 (n 1.5), 0.3460 (n 1.7) (ray optics: critical angle asin(1/n), Hecht, Optics, ch. 4) — seed 102', () => {
    for (const [n, want] of [[1.5, 0.4444], [1.7, 0.346]] as const) {
      const t = traceScene(planarStack({ nE: n, nS: n, fresnel: 'none', profile: 'lambertian' }), N, 102)
      const { p, sigma } = fraction(t, T_EXTRACTED)
      expectWithinSigma(`Lambertian n ${n}`, p, want, Math.hypot(sigma, 5e-5))
    }
  })
  it('mode split 1.7 | 1.5 | air, Rb = 1: air 0.1913, substrate (trapped) 0.3381, waveguided 0.4706 (ray optics: critical angles, Hecht, Optics, ch. 4) — seed 103', () => {
    const t = traceScene(planarStack({ fresnel: 'none' }), N, 103)
    expectWithinSigma('air', fraction(t, T_EXTRACTED).p, 0.1913, Math.hypot(fraction(t, T_EXTRACTED).sigma, 5e-5))
    expectWithinSigma('substrate modes', fraction(t, T_TRAPPED).p, 0.3381, Math.hypot(fraction(t, T_TRAPPED).sigma, 5e-5))
    expectWithinSigma('waveguided', fraction(t, T_WAVEGUIDED).p, 0.4706, Math.hypot(fraction(t, T_WAVEGUIDED).sigma, 5e-5))
    expect(t[T_EXTRACTED]! + t[T_TRAPPED]! + t[T_WAVEGUIDED]!).toBe(N)
  })
})

describe('planar stack with Fresnel and a specular mirror vs 1-D quadrature (Fresnel: Hecht, Optics, ch. 4; Born & Wolf, §1.5)', () => {
  it('the quadrature reproduces the listed values: Rb 1.0 → 0.1913, Rb 0.8 → 0.1678 (isotropic, 1.7 | 1.5, averaged)', () => {
    expect(planarQuadrature(1.7, 1.5, 1, 0, 100, true, 'isotropic')).toBeCloseTo(0.1913, 4)
    expect(planarQuadrature(1.7, 1.5, 0.8, 0, 100, true, 'isotropic')).toBeCloseTo(0.1678, 4)
  })
  it.each([
    [1.7, 1.5, 1.0, 0, 'isotropic', 201],
    [1.7, 1.5, 0.8, 0, 'isotropic', 202],
    [1.8, 1.5, 0.5, 0, 'lambertian', 203],
    [1.5, 1.7, 0.9, 0, 'isotropic', 204], // emitter below a denser substrate: TIR at the bottom face from above
    [1.7, 1.5, 0.8, 2, 'isotropic', 205], // absorbing substrate, 2 /mm over 100 µm
  ] as const)('nE %s, nS %s, Rb %s, α %s /mm, %s — seed %s', (nE, nS, rb, alphaPerMm, profile, seed) => {
    const want = planarQuadrature(nE, nS, rb, alphaPerMm / 1000, 100, true, profile)
    const t = traceScene(planarStack({ nE, nS, rb, profile, absorptionPerMm: alphaPerMm }), N, seed)
    const { p, sigma } = fraction(t, T_EXTRACTED)
    expectWithinSigma('extraction', p, want, sigma)
    expect(t[T_EXTRACTED]! + t[T_REFLECTOR]! + t[T_SUBSTRATE]! + t[T_WAVEGUIDED]! + t[T_TRAPPED]! + t[T_UNRESOLVED]!).toBe(t[T_RAYS])
    if (alphaPerMm > 0) expect(t[T_SUBSTRATE]).toBeGreaterThan(0)
    else expect(t[T_SUBSTRATE]).toBe(0)
  })
})

describe('air intensity from the radiance theorem (L/n² conserved across an interface; standard radiometry, from memory)', () => {
  it('shape formula cosθ/√(1 − sin²θ/n²): 0.9186 at 30°, 0.8018 at 45°, 0.6124 at 60° for n 1.5', () => {
    const f = (deg: number) => Math.cos((deg * Math.PI) / 180) / Math.sqrt(1 - Math.sin((deg * Math.PI) / 180) ** 2 / 2.25)
    expect(f(30)).toBeCloseTo(0.9186, 4)
    expect(f(45)).toBeCloseTo(0.8018, 4)
    expect(f(60)).toBeCloseTo(0.6124, 4)
  })
  it('isotropic in 1.5 | 1.5 over an ideal mirror, no Fresnel: every 1° bin within 5σ of the radiance-theorem count, χ² below dof + 5√(2dof) — seed 301', () => {
    const n = 1.5, rays = 400_000
    const t = traceScene(planarStack({ nE: n, nS: n, fresnel: 'none' }), rays, 301)
    // Upward directions in the medium are uniform in μ on [0, 1] (mirror included); air angle θ ↔ medium μm with
    // sinθ = n·sinθm, so the expected fraction of a bin [θa, θb] is μm(θa) − μm(θb). This integrates
    // I(θ) ∝ cosθ/√(1 − sin²θ/n²), the listed shape, over the bin.
    const muM = (deg: number) => Math.sqrt(1 - Math.sin((deg * Math.PI) / 180) ** 2 / (n * n))
    let chi2 = 0, dof = 0
    for (let b = 0; b < THETA_BINS; b++) {
      const pExp = muM(b) - muM(b + 1)
      const e = rays * pExp
      const c = t[T_THETA + b]!
      expectWithinSigma(`bin ${b}°`, c, e, Math.sqrt(e * (1 - pExp)))
      chi2 += ((c - e) * (c - e)) / e
      dof++
    }
    expect(chi2).toBeLessThan(dof + 5 * Math.sqrt(2 * dof))
  })
})

describe('trapped and accounting in the planar device', () => {
  it('specular mirror: beyond-cone substrate rays end as trapped; a diffuse reflector leaves none trapped — seed 401', () => {
    const spec = traceScene(planarStack({ rb: 0.8 }), 100_000, 401)
    expect(spec[T_TRAPPED]).toBeGreaterThan(0)
    const diff = traceScene(planarStack({ rb: 0.8, fd: 0.5 }), 100_000, 401)
    expect(diff[T_TRAPPED]).toBe(0)
    expect(diff[T_EXTRACTED]! + diff[T_REFLECTOR]! + diff[T_WAVEGUIDED]! + diff[T_UNRESOLVED]!).toBe(100_000)
    // diffuse re-emission recycles substrate modes: more light out than with a mirror (common practice)
    expect(diff[T_EXTRACTED]!).toBeGreaterThan(spec[T_EXTRACTED]!)
  })
})

describe('half-luminance angle (closed form, common practice)', () => {
  it('I(θ) = cos³θ in air (index 1 throughout, no mirror): L ∝ cos²θ halves at 45° — within 5σ ≈ 2.5° (σ from the window and on-axis counts) — seed 1401', () => {
    const table: Array<[number, number]> = []
    for (let deg = 0; deg <= 90; deg++) table.push([deg, Math.cos((deg * Math.PI) / 180) ** 3])
    const sc = planarStack({ nE: 1, nS: 1, rb: 0, profile: { table } })
    const r = traceScenario(sc, { rays: 200_000, seed: 1401 })
    expect(r.luminance.halfLuminanceAngleDeg).not.toBeNull()
    // σθ ≈ √(σL,window² + (½σL,axis)²)/|dL/dθ|, |dL/dθ| = sin2θ = 1 per rad at 45° (L normalised on axis)
    const n = 200_000
    // share of a cone ring: ∫cos³θ sinθ dθ ∝ cos⁴θ
    const frac = (a: number, b: number) => Math.cos((a * Math.PI) / 180) ** 4 - Math.cos((b * Math.PI) / 180) ** 4
    const sWin = 1 / Math.sqrt(n * frac(42.5, 47.5)) * 0.5, sAxis = 1 / Math.sqrt(n * frac(0, 5))
    const sigmaDeg = (Math.hypot(sWin, 0.5 * sAxis) * 180) / Math.PI
    expectWithinSigma('half-luminance angle (deg)', r.luminance.halfLuminanceAngleDeg!, 45, sigmaDeg)
    // the reported σ agrees with this estimate within a factor 2 (the slope is estimated from the data)
    expect(r.luminance.halfLuminanceAngleStdErrDeg! / sigmaDeg).toBeGreaterThan(0.5)
    expect(r.luminance.halfLuminanceAngleStdErrDeg! / sigmaDeg).toBeLessThan(2)
    // and the luminance shape itself: relative L(θ)/L(0) at 60° is cos²60° = 0.25
    const L = r.luminance
    const avg = (L.relative[59]! + L.relative[60]!) / 2
    const l60 = avg / L.onAxisRelative
    const s60 = l60 * Math.hypot(Math.hypot(L.relativeStdErr[59]!, L.relativeStdErr[60]!) / 2 / avg, L.onAxisRelativeStdErr / L.onAxisRelative)
    expectWithinSigma('L(60°)/L(0)', l60, 0.25, s60)
  })
  it('a Lambertian source in air keeps its luminance: no half angle (null), relative luminance ≈ 1 — seed 1402', () => {
    const r = traceScenario(planarStack({ nE: 1, nS: 1, rb: 0, profile: 'lambertian' }), { rays: 200_000, seed: 1402 })
    expect(r.luminance.halfLuminanceAngleDeg).toBeNull()
    expectWithinSigma('on-axis relative luminance', r.luminance.onAxisRelative, 1, r.luminance.onAxisRelativeStdErr)
    expect(r.extraction).toBe(1) // index 1 everywhere, all light goes up: nothing can be lost
  })
})
