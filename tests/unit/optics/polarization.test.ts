// Polarisation-tracked Fresnel (crossings.ts): Brewster's angle, TIR retardance of a Fresnel rhomb, the ideal-metal
// mirror and the launch state, against closed forms (Hecht, Optics, ch. 4 and §8.7; Born & Wolf, Principles of
// Optics, §1.5).
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  brewsterAngleRad, fresnelRp, fresnelRs, metalReflect, polarizedReflectance, polarizedReflects, polarizedTir, randomPolarization,
} from '../../../shared/optics/crossings'

const DEG = Math.PI / 180

/** Field of amplitude (as, ap) along s = ŷ and p = s × k for a ray k in the xz-plane (k = (sinθ, 0, cosθ)). */
function fieldXZ(theta: number, asRe: number, apRe: number, apIm = 0): { f: Float64Array; k: [number, number, number] } {
  const k: [number, number, number] = [Math.sin(theta), 0, Math.cos(theta)]
  // s = k × n with n = +z: (0·1 − kz·0, kz·0 − kx·1, 0) = (0, −kx, 0) → −ŷ; p = s × k
  const s = [0, -1, 0], p = [s[1]! * k[2] - s[2]! * k[1], s[2]! * k[0] - s[0]! * k[2], s[0]! * k[1] - s[1]! * k[0]]
  const f = new Float64Array(6)
  for (let i = 0; i < 3; i++) { f[2 * i] = asRe * s[i]! + apRe * p[i]!; f[2 * i + 1] = apIm * p[i]! }
  return { f, k }
}

/** Complex components of f along s = −ŷ and p = s × q for a wave along q in the xz-plane. */
function components(f: Float64Array, q: [number, number, number]) {
  const s = [0, -1, 0], p = [s[1]! * q[2] - s[2]! * q[1], s[2]! * q[0] - s[0]! * q[2], s[0]! * q[1] - s[1]! * q[0]]
  const dot = (v: number[], o: number) => v[0]! * f[0 + o]! + v[1]! * f[2 + o]! + v[2]! * f[4 + o]!
  return { sRe: dot(s, 0), sIm: dot(s, 1), pRe: dot(p, 0), pIm: dot(p, 1) }
}

describe('Brewster angle (Hecht, Optics, ch. 4: tan θB = n2/n1, rp = 0)', () => {
  it.each([[1, 1.5], [1.5, 1], [1.7, 1.5], [1, 2]])('n1 %s → n2 %s: p light is never reflected, s light with Rs', (n1, n2) => {
    const th = brewsterAngleRad(n1, n2)
    const cosI = Math.cos(th), sinT = (n1 / n2) * Math.sin(th), cosT = Math.sqrt(1 - sinT * sinT)
    const p = fieldXZ(th, 0, 1)
    expect(polarizedReflectance(p.f, ...p.k, 0, 0, 1, cosI, cosT, n1, n2)).toBeLessThan(1e-28)
    expect(fresnelRp(cosI, n1, n2)).toBeLessThan(1e-28)
    // a draw of 1e-12 (far below any realistic uniform's chance) still transmits a p ray at Brewster's angle
    expect(polarizedReflects(p.f, 1e-12, ...p.k, 0, 0, 1, cosI, cosT, n1, n2)).toBe(false)
    const s = fieldXZ(th, 1, 0)
    expect(polarizedReflectance(s.f, ...s.k, 0, 0, 1, cosI, cosT, n1, n2)).toBeCloseTo(fresnelRs(cosI, n1, n2), 14)
    // 1 → 1.5 at Brewster (56.31°): Rs = 0.1479 (Hecht, Optics, ch. 4 formula; the 4-figure value from memory)
    if (n1 === 1 && n2 === 1.5) expect(fresnelRs(cosI, n1, n2)).toBeCloseTo(0.1479, 4)
  })
  it('a mixed linear state reflects with Rs·cos²ψ + Rp·sin²ψ (property over angle, ψ and indices)', () => {
    fc.assert(fc.property(fc.double({ min: 0.01, max: 1.5, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }),
      fc.double({ min: 1, max: 2.5, noNaN: true }), fc.double({ min: 1, max: 2.5, noNaN: true }), (th, psi, n1, n2) => {
        const sinT = (n1 / n2) * Math.sin(th)
        if (sinT >= 1) return
        const cosT = Math.sqrt(1 - sinT * sinT), cosI = Math.cos(th)
        const { f, k } = fieldXZ(th, Math.cos(psi), Math.sin(psi))
        const want = fresnelRs(cosI, n1, n2) * Math.cos(psi) ** 2 + fresnelRp(cosI, n1, n2) * Math.sin(psi) ** 2
        expect(polarizedReflectance(f, ...k, 0, 0, 1, cosI, cosT, n1, n2)).toBeCloseTo(want, 12)
      }))
  })
  it('normal incidence: the reflected field is rs times the incident one in the lab frame (rp = −rs there)', () => {
    const f = new Float64Array([0.6, 0, 0.8, 0, 0, 0])
    expect(polarizedReflects(f, 0, 0, 0, 1, 0, 0, 1, 1, 1, 1.5, 1)).toBe(true) // u = 0 < R = 0.04: reflected
    expect(f[0]).toBeCloseTo(0.6, 14); expect(f[2]).toBeCloseTo(0.8, 14) // renormalised; sign of rs common to both
  })
})

describe('total internal reflection keeps the phase: Fresnel rhomb (Hecht, Optics, §8.7: n 1.51 at 54.6° gives 45° per reflection)', () => {
  const n = 1.51, th = 54.6 * DEG
  // retardance δ with tan(δ/2) = cosθ·√(sin²θ − (1/n)²)/sin²θ (the TIR phase shifts of Born & Wolf, Principles of Optics, §1.5.4; the form from memory)
  const closed = 2 * Math.atan((Math.cos(th) * Math.sqrt(Math.sin(th) ** 2 - 1 / (n * n))) / Math.sin(th) ** 2)
  it('closed form gives 45.0° (to 0.1°)', () => expect(Math.abs(closed / DEG - 45)).toBeLessThan(0.1))
  it('one reflection: |Es| = |Ep| kept, phase difference equals the closed form', () => {
    const { f, k } = fieldXZ(th, Math.SQRT1_2, Math.SQRT1_2)
    const sin2T = n * n * Math.sin(th) ** 2
    expect(polarizedTir(f, ...k, 0, 0, 1, Math.cos(th), sin2T, n, 1)).toBe(true)
    const kr: [number, number, number] = [k[0], 0, -k[2]]
    const c = components(f, kr)
    expect(Math.hypot(c.sRe, c.sIm)).toBeCloseTo(Math.SQRT1_2, 12)
    expect(Math.hypot(c.pRe, c.pIm)).toBeCloseTo(Math.SQRT1_2, 12)
    const delta = Math.atan2(c.sIm, c.sRe) - Math.atan2(c.pIm, c.pRe)
    expect(Math.abs(Math.abs(delta) - closed)).toBeLessThan(1e-10)
  })
  it('two reflections on the rhomb\'s parallel faces: 45° linear light leaves circular (quarter wave)', () => {
    const { f, k } = fieldXZ(th, Math.SQRT1_2, Math.SQRT1_2)
    const sin2T = n * n * Math.sin(th) ** 2, cosI = Math.cos(th)
    polarizedTir(f, ...k, 0, 0, 1, cosI, sin2T, n, 1)
    const k1: [number, number, number] = [k[0], 0, -k[2]]
    polarizedTir(f, ...k1, 0, 0, -1, cosI, sin2T, n, 1) // the opposite face: normal −z, same incidence angle
    const c = components(f, k) // back along the original direction
    expect(Math.hypot(c.sRe, c.sIm)).toBeCloseTo(Math.SQRT1_2, 12)
    expect(Math.hypot(c.pRe, c.pIm)).toBeCloseTo(Math.SQRT1_2, 12)
    const delta = Math.atan2(c.sIm, c.sRe) - Math.atan2(c.pIm, c.pRe)
    const d = Math.abs(((delta / DEG + 540) % 360) - 180)
    expect(Math.abs(d - 90)).toBeLessThan(0.2) // 2 × 45° within the 54.6° rounding of the angle
  })
})

describe('ideal metal mirror (rs = −1, rp = +1) and the launch state', () => {
  it('keeps s as s and p as p with unit modulus at any angle; the field stays perpendicular to the ray', () => {
    fc.assert(fc.property(fc.double({ min: 0, max: 1.5, noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), (th, psi) => {
      const k: [number, number, number] = [Math.sin(th), 0, Math.cos(th)] // after the mirror
      const k0: [number, number, number] = [k[0], 0, -k[2]] // going down onto the mirror
      const fd = new Float64Array(6)
      randomPolarization(fd, psi / 6.3, ...k0)
      const before = components(fd, k0)
      metalReflect(fd, ...k0)
      const after = components(fd, k)
      expect(Math.abs(after.sRe)).toBeCloseTo(Math.abs(before.sRe), 12)
      expect(Math.abs(after.pRe)).toBeCloseTo(Math.abs(before.pRe), 12)
      expect(fd[0]! * k[0] + fd[2]! * k[1] + fd[4]! * k[2]).toBeCloseTo(0, 12)
    }))
  })
  it('launch: a real unit field perpendicular to the ray at angle 2πu from s (ensemble ⟨|Es|²⟩ = ½, unpolarised)', () => {
    let sum = 0
    const m = 1000
    for (let i = 0; i < m; i++) {
      const f = new Float64Array(6)
      const k: [number, number, number] = [0.6, 0, 0.8]
      randomPolarization(f, (i + 0.5) / m, ...k)
      expect(Math.hypot(f[0]!, f[2]!, f[4]!)).toBeCloseTo(1, 14)
      expect(f[1]! + f[3]! + f[5]!).toBe(0)
      expect(f[0]! * k[0] + f[2]! * k[1] + f[4]! * k[2]).toBeCloseTo(0, 14)
      sum += f[2]! * f[2]! // s = ±ŷ for a ray in the xz-plane
    }
    expect(sum / m).toBeCloseTo(0.5, 12) // midpoint rule of cos² over a period is exact
  })
  it('along the normal (k ∥ n) some perpendicular s is chosen and the field stays a unit transverse vector', () => {
    const f = new Float64Array(6)
    randomPolarization(f, 0.3, 0, 0, 1)
    expect(Math.hypot(f[0]!, f[2]!, f[4]!)).toBeCloseTo(1, 14)
    expect(f[4]).toBeCloseTo(0, 14)
    metalReflect(f, 0, 0, -1)
    expect(Math.hypot(f[0]!, f[2]!, f[4]!)).toBeCloseTo(1, 14)
  })
})
