// Interface formulas against handbook values (Hecht, Optics, ch. 4; Born & Wolf, Principles of Optics, §1.5).
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  brewsterAngleRad, cosTransmitted, criticalAngleRad, escapeConeFraction, fresnelAveraged, fresnelRp, fresnelRs,
} from '../../../shared/optics/interfaces'

const DEG = Math.PI / 180
// The reference values are given to 4 significant figures: half a unit in the last place is the tolerance.
const close4 = (got: number, want: number) => expect(Math.abs(got - want)).toBeLessThanOrEqual(0.5 * 10 ** (Math.floor(Math.log10(Math.abs(want))) - 3) + 1e-15)

describe('Fresnel at normal incidence (Hecht ch. 4)', () => {
  it.each([
    [1.5, 1, 0.04], [1.7, 1, 0.06722], [1.8, 1, 0.08163], [1.7, 1.5, 0.003906],
  ])('n1=%s → n2=%s: R = %s', (n1, n2, want) => {
    close4(fresnelAveraged(1, n1, n2), want)
    close4(fresnelRs(1, n1, n2), want)
    close4(fresnelRp(1, n1, n2), want)
  })
})

describe('Fresnel power coefficients at oblique incidence (Hecht ch. 4)', () => {
  it('1 → 1.5 at 45° and 60°; 1.5 → 1 at 30°', () => {
    close4(fresnelRs(Math.cos(45 * DEG), 1, 1.5), 0.09201)
    close4(fresnelRp(Math.cos(45 * DEG), 1, 1.5), 0.008466)
    close4(fresnelRs(Math.cos(60 * DEG), 1, 1.5), 0.1766)
    close4(fresnelRp(Math.cos(60 * DEG), 1, 1.5), 0.001802)
    close4(fresnelRs(Math.cos(30 * DEG), 1.5, 1), 0.1058)
    close4(fresnelRp(Math.cos(30 * DEG), 1.5, 1), 0.004608)
    expect(fresnelAveraged(Math.cos(45 * DEG), 1, 1.5)).toBeCloseTo((0.09201 + 0.008466) / 2, 4)
  })
})

describe('critical and Brewster angles (Hecht ch. 4)', () => {
  it.each([[1.5, 1, 41.81], [1.7, 1, 36.03], [1.8, 1, 33.75], [1.7, 1.5, 61.93]])('critical %s → %s = %s°', (n1, n2, deg) => {
    close4(criticalAngleRad(n1, n2) / DEG, deg)
    // just beyond the critical angle: total reflection; just inside: partial
    expect(fresnelAveraged(Math.cos((deg + 0.01) * DEG), n1, n2)).toBe(1)
    expect(fresnelAveraged(Math.cos((deg - 0.01) * DEG), n1, n2)).toBeLessThan(1)
  })
  it('no critical angle into a denser medium', () => {
    expect(Number.isNaN(criticalAngleRad(1, 1.5))).toBe(true)
  })
  it('Brewster: air → 1.5 at 56.31°, 1.5 → air at 33.69°, Rp = 0 there', () => {
    close4(brewsterAngleRad(1, 1.5) / DEG, 56.31)
    close4(brewsterAngleRad(1.5, 1) / DEG, 33.69)
    expect(fresnelRp(Math.cos(brewsterAngleRad(1, 1.5)), 1, 1.5)).toBeLessThan(1e-12)
    expect(fresnelRp(Math.cos(brewsterAngleRad(1.5, 1)), 1.5, 1)).toBeLessThan(1e-12)
    expect(fresnelRs(Math.cos(brewsterAngleRad(1, 1.5)), 1, 1.5)).toBeGreaterThan(0.1)
  })
})

describe('derived closed forms', () => {
  it('incoherent thick slab at normal incidence T = (1−R)/(1+R) = 2n/(n²+1) = 0.9231 for n = 1.5 (Hecht, Optics, ch. 4)', () => {
    const R = fresnelAveraged(1, 1, 1.5)
    close4((1 - R) / (1 + R), 0.9231)
  })
  it('escape cone 1 − cos θc: 0.2546 (n 1.5), 0.1913 (n 1.7); small-angle 1/(2n²) 0.2222, 0.1730 (Greenham et al. 1994, formula from memory)', () => {
    close4(escapeConeFraction(1.5), 0.2546)
    close4(escapeConeFraction(1.7), 0.1913)
    close4(1 / (2 * 1.5 ** 2), 0.2222)
    close4(1 / (2 * 1.7 ** 2), 0.173)
    // the approximation underestimates, by less than 15 % at these indices
    for (const n of [1.5, 1.7]) {
      expect(escapeConeFraction(n)).toBeGreaterThan(1 / (2 * n * n))
      expect(escapeConeFraction(n)).toBeLessThan(1.15 / (2 * n * n))
    }
  })
})

describe('properties (common practice)', () => {
  it('Snell: n1 sinθ1 = n2 sinθ2; reciprocity R(1→2, θ1) = R(2→1, θ2); 0 ≤ R ≤ 1', () => {
    fc.assert(fc.property(fc.double({ min: 1, max: 3, noNaN: true }), fc.double({ min: 1, max: 3, noNaN: true }), fc.double({ min: 0.01, max: 1, noNaN: true }),
      (n1, n2, cosI) => {
        const cosT = cosTransmitted(cosI, n1, n2)
        const R = fresnelAveraged(cosI, n1, n2)
        expect(R).toBeGreaterThanOrEqual(0)
        expect(R).toBeLessThanOrEqual(1)
        if (cosT < 0) { expect(R).toBe(1); return }
        expect(n1 * Math.sqrt(1 - cosI * cosI)).toBeCloseTo(n2 * Math.sqrt(1 - cosT * cosT), 7)
        expect(fresnelAveraged(cosT, n2, n1)).toBeCloseTo(R, 7) // cosT round trip loses digits near grazing
      }), { seed: 31 })
  })
})
