// Thin-film stack optics against closed forms: the homogeneous medium, the image dipole at a perfect mirror
// (Novotny & Hecht, Principles of Nano-Optics, ch. 10), energy closure in a lossless stack, single-interface
// Fresnel (Hecht, Optics, ch. 4), the quarter-wave layer (Hecht ch. 9; Macleod, Thin-Film Optical Filters, ch. 3),
// normal-incidence reflectance of an absorbing medium (Born & Wolf, Principles of Optics, §14.2) — and the schema.
import { describe, expect, it } from 'vitest'
import { thinFilmSchema, type ThinFilm, type ThinFilmInput } from '../../shared/types/thin-film'
import { fresnelRp, fresnelRs } from '../../shared/optics/interfaces'
import {
  glassAngular, integrandAt, prepareStack, stackReflectance, thinFilmAt, thinFilmCacheKey, thinFilmTable,
  V_G_TEH, V_G_TMH, V_G_TMV, V_K_TEH, V_K_TMH, V_K_TMV, V_T_TEH, V_T_TMH, V_T_TMV,
} from '../../shared/optics/thinfilm'

const DEG = Math.PI / 180
const layer = (thicknessNm: number, n: number, k = 0, emitting = false) => ({ thicknessNm, material: { n, k }, ...(emitting ? { emitting } : {}) })
const stack = (input: ThinFilmInput) => thinFilmSchema.parse(input)

describe('homogeneous stack: every layer, the glass and the top of one index (free-space dipole)', () => {
  const n = 1.7
  const tf = stack({ layers: [layer(80, n), layer(30, n, 0, true), layer(120, n)], cathode: { material: { n, k: 0 } }, emitterPositionNm: 11 })
  it.each([450, 550, 700])('λ = %s nm: F = 1 within 1e-4 for horizontal and vertical dipoles; the glass takes ½', (lam) => {
    for (const theta of [1, 0, 2 / 3]) {
      const r = thinFilmAt({ ...tf, horizontalDipoleFraction: theta }, lam, { glassIndex: n })
      expect(Math.abs(r.purcell.horizontal - 1)).toBeLessThan(1e-4)
      expect(Math.abs(r.purcell.vertical - 1)).toBeLessThan(1e-4)
      expect(Math.abs(r.glassS + r.glassP - 0.5)).toBeLessThan(1e-4)
      expect(Math.abs(r.modes.top - 0.5)).toBeLessThan(1e-4)
    }
  })
  it('the isotropic mix radiates 1/(4π) per sr into the glass at every angle (isotropic emission)', () => {
    const angles = Array.from({ length: 18 }, (_, i) => i * 5 * DEG)
    const g = glassAngular(tf, 550, { glassIndex: n }, angles)
    // 1e-5: the non-emitting layers carry the LOSS_FLOOR (Im ε = 1e-6), which attenuates the glass power by ~2e-5 relative
    for (let i = 0; i < angles.length; i++) expect(Math.abs(g.s[i]! + g.p[i]! - 1 / (4 * Math.PI))).toBeLessThan(1e-5)
  })
})

describe('perfect-mirror limit: image-dipole closed forms, x = 2kd (Novotny & Hecht, ch. 10)', () => {
  // |n| = 1e4 stands for the perfect conductor (r_s → −1, r_p → +1 to ~1e-4); the schema caps k at 20 for real
  // metals, so this stack is built directly. Distances in wavelengths in the emitting medium.
  const n = 1.5, lam = 550
  const fPerp = (x: number) => 1 + 3 * (Math.sin(x) / x ** 3 - Math.cos(x) / x ** 2)
  const fPar = (x: number) => 1 - 1.5 * (Math.sin(x) / x + Math.cos(x) / x ** 2 - Math.sin(x) / x ** 3)
  it.each([0.05, 0.1, 0.2, 0.35, 0.5, 0.75, 1.0, 1.5])('d = %s λ: F⊥ and F∥ within 1 %%', (f) => {
    const d = (f * lam) / n
    const x = 2 * ((2 * Math.PI * n) / lam) * d
    const tf: ThinFilm = { layers: [layer(2 * d, n, 0, true)], cathode: { material: { n: 0.001, k: 1e4 } }, emitterPositionNm: d,
      horizontalDipoleFraction: 2 / 3, radiativeEfficiency: 1 }
    const r = thinFilmAt(tf, lam, { glassIndex: n })
    expect(Math.abs(r.purcell.vertical / fPerp(x) - 1)).toBeLessThan(0.01)
    expect(Math.abs(r.purcell.horizontal / fPar(x) - 1)).toBeLessThan(0.01)
  })
})

describe('energy closure in a lossless stack with a dielectric top', () => {
  const tf = stack({ layers: [layer(60, 1.85), layer(30, 1.7, 0, true), layer(45, 1.6)], cathode: { material: { n: 1.4, k: 0 } }, emitterPositionNm: 12 })
  const opt = { glassIndex: 1.5, glassThicknessUm: 0, glassAbsorptionPerMm: 0, outsideIndex: 1 }
  it('pointwise: K(u) = P_glass(u) + P_top(u) within 1e-3 for each dipole component where both propagate', () => {
    const P = prepareStack(tf, 1.5, 550)
    const v = new Float64Array(12)
    const uTop = 1.4 / 1.7
    for (let i = 1; i < 60; i++) {
      const u = (i / 60) * uTop
      integrandAt(P, opt, 0, u, v)
      for (const [k, g, t] of [[V_K_TEH, V_G_TEH, V_T_TEH], [V_K_TMH, V_G_TMH, V_T_TMH], [V_K_TMV, V_G_TMV, V_T_TMV]] as const) {
        expect(Math.abs(v[g]! + v[t]! - v[k]!)).toBeLessThanOrEqual(1e-3 * Math.abs(v[k]!))
      }
    }
  })
  it('integrated: glass + top = ∫K du over the glass-propagating range within 1e-3 of F (nothing absorbed), Θ = 1 and 0', () => {
    for (const theta of [1, 0]) {
      const r = thinFilmAt({ ...tf, horizontalDipoleFraction: theta }, 550, opt)
      expect(Math.abs(r.modes.absorbed)).toBeLessThan(1e-3)
      expect(r.modes.top).toBeGreaterThan(0.05)
      expect(r.modes.waveguided).toBeGreaterThan(0.01)
    }
  })
  it('guided modes of the lossless stack (delta functions) carry the k → 0 limit of a lossy stack: the waveguided share moves linearly in k (×10 in k ≈ ×10 in the shift) and by < 1e-3 at k = 1e-5', () => {
    const withK = (k: number) => thinFilmAt(stack({ ...tf, layers: [layer(60, 1.85, k), layer(30, 1.7, 0, true), layer(45, 1.6, k)] }), 550, opt)
    const a = thinFilmAt(tf, 550, opt), b = withK(1e-5), c = withK(1e-4)
    const d1 = a.modes.waveguided - b.modes.waveguided, d2 = a.modes.waveguided - c.modes.waveguided
    expect(Math.abs(d1)).toBeLessThan(1e-3)
    expect(Math.abs(a.purcell.mixed - b.purcell.mixed)).toBeLessThan(1e-3)
    expect(d2 / d1).toBeGreaterThan(7)
    expect(d2 / d1).toBeLessThan(13)
  })
  it('the same stack with an absorbing layer does absorb (the closure test can fail)', () => {
    const lossy = stack({ ...tf, layers: [layer(60, 1.85, 0.05), layer(30, 1.7, 0, true), layer(45, 1.6)] })
    expect(thinFilmAt(lossy, 550, opt).modes.absorbed).toBeGreaterThan(0.01)
  })
})

describe('stack reflectance seen from the glass', () => {
  it('one interface 1.5 → 1.0 equals the Fresnel formulas, total reflection beyond the critical angle (Hecht ch. 4)', () => {
    // 30°: R_s = 0.1058, R_p = 0.004608 (Hecht, Optics, ch. 4, to 4 figures)
    const tf = stack({ layers: [layer(70, 1.5, 0, true)], cathode: { material: { n: 1.0, k: 0 } }, emitterPositionNm: 10 })
    const P = prepareStack(tf, 1.5, 550)
    const r30 = stackReflectance(P, 30 * DEG)
    expect(r30.rs).toBeCloseTo(0.1058, 4)
    expect(r30.rp).toBeCloseTo(0.004608, 5)
    for (const deg of [0, 10, 20, 35, 40]) {
      const ci = Math.cos(deg * DEG), ct = Math.sqrt(1 - (1.5 * Math.sin(deg * DEG)) ** 2)
      const rs = ((1.5 * ci - ct) / (1.5 * ci + ct)) ** 2, rp = ((ci - 1.5 * ct) / (ci + 1.5 * ct)) ** 2
      const r = stackReflectance(P, deg * DEG)
      expect(Math.abs(r.rs - rs)).toBeLessThan(1e-12)
      expect(Math.abs(r.rp - rp)).toBeLessThan(1e-12)
    }
    for (const deg of [45, 60, 85]) {
      const r = stackReflectance(P, deg * DEG)
      expect(r.rs).toBeCloseTo(1, 12)
      expect(r.rp).toBeCloseTo(1, 12)
    }
  })
  it('absorbing cathode at normal incidence: R = ((n − n0)² + k²)/((n + n0)² + k²) (Born & Wolf §14.2)', () => {
    const tf = stack({ layers: [layer(70, 1.5, 0, true)], cathode: { material: { n: 0.96, k: 6.69 } }, emitterPositionNm: 10 })
    const r = stackReflectance(prepareStack(tf, 1.5, 550), 0)
    const want = ((0.96 - 1.5) ** 2 + 6.69 ** 2) / ((0.96 + 1.5) ** 2 + 6.69 ** 2)
    expect(Math.abs(r.rs - want)).toBeLessThan(1e-12)
    expect(Math.abs(r.rp - want)).toBeLessThan(1e-12)
  })
  it('quarter-wave MgF₂ on glass from air: R = ((n0·ns − n1²)/(n0·ns + n1²))² = 1.26 %, a minimum over λ (Hecht ch. 9; Macleod ch. 3)', () => {
    const n0 = 1.0, n1 = 1.38, ns = 1.52, lam = 550
    const tf = stack({ layers: [layer(lam / (4 * n1), n1, 0, true)], cathode: { material: { n: ns, k: 0 } }, emitterPositionNm: 0 })
    const want = ((n0 * ns - n1 * n1) / (n0 * ns + n1 * n1)) ** 2
    const at = (l: number) => stackReflectance(prepareStack(tf, n0, l), 0).rs
    expect(Math.abs(at(lam) - want)).toBeLessThan(1e-12)
    expect(want).toBeCloseTo(0.0126, 4)
    expect(at(500)).toBeGreaterThan(at(lam))
    expect(at(600)).toBeGreaterThan(at(lam))
  })
})

describe('the glass angular table and the cache', () => {
  const tf = stack({ layers: [layer(100, 1.9, 0.01), layer(40, 1.75), layer(20, 1.75, 0, true), layer(50, 1.75)], cathode: { material: { n: 0.96, k: 6.69 } },
    emitterPositionNm: 10 })
  it('∫ P_Ω dΩ over the tabulated glass angles equals the glass share from the u integral within 1e-3', () => {
    const t = thinFilmTable(tf, [550], { glassIndex: 1.5 }, 721)
    let s = 0, p = 0
    const A = t.glassAnglesRad.length, h = (Math.PI / 2) / (A - 1)
    for (let i = 0; i < A; i++) {
      const wgt = (i === 0 || i === A - 1 ? 0.5 : 1) * h * 2 * Math.PI * Math.sin(t.glassAnglesRad[i]!)
      s += t.glassS[i]! * wgt
      p += t.glassP[i]! * wgt
    }
    expect(Math.abs(s - t.points[0]!.glassS)).toBeLessThan(1e-3)
    expect(Math.abs(p - t.points[0]!.glassP)).toBeLessThan(1e-3)
  })
  it('flat η_air from the u integral equals Σ_pol ∫ P_Ω·T_ga·A/(1 − R_stack·R_ga·A²) dΩ over the tabulated angles within 1e-3 (Fresnel from interfaces.ts)', () => {
    const optics = { glassIndex: 1.5, glassThicknessUm: 700, glassAbsorptionPerMm: 0.5, outsideIndex: 1 }
    const t = thinFilmTable(tf, [520], optics, 1441)
    const A = t.glassAnglesRad.length, h = (Math.PI / 2) / (A - 1)
    let air = 0
    for (let i = 0; i < A; i++) {
      const th = t.glassAnglesRad[i]!, c = Math.cos(th)
      if (1.5 * Math.sin(th) >= 1) continue
      const pass = Math.exp(-(0.5 / 1000) * 700 / c)
      const rs = fresnelRs(c, 1.5, 1), rp = fresnelRp(c, 1.5, 1)
      const f = (pz: number, rga: number, rst: number) => pz * (1 - rga) * pass / (1 - rst * rga * pass * pass)
      air += (i === 0 ? 0.5 : 1) * h * 2 * Math.PI * Math.sin(th) * (f(t.glassS[i]!, rs, t.stackRs[i]!) + f(t.glassP[i]!, rp, t.stackRp[i]!))
    }
    expect(Math.abs(air - t.points[0]!.modes.air)).toBeLessThan(1e-3)
    expect(t.points[0]!.modes.air).toBeLessThan(thinFilmAt(tf, 520, { glassIndex: 1.5 }).modes.air)
  })
  it('the mode split sums to 1; the same stack and grid hit the cache; a changed thickness changes the key', () => {
    const a = thinFilmTable(tf, [500, 550], { glassIndex: 1.5 })
    expect(thinFilmTable(tf, [500, 550], { glassIndex: 1.5 })).toBe(a)
    const m = a.points[1]!.modes
    expect(Math.abs(m.air + m.glassTrapped + m.waveguided + m.evanescent + m.absorbed + m.top - 1)).toBeLessThan(1e-12)
    const thicker = { ...tf, layers: tf.layers.map((l, i) => (i === 3 ? { ...l, thicknessNm: 51 } : l)) }
    expect(thinFilmCacheKey(thicker, [500, 550], { glassIndex: 1.5 })).not.toBe(a.key)
    expect(thinFilmCacheKey({ ...tf, layers: tf.layers.map((l) => ({ ...l, name: 'renamed' })) }, [500, 550], { glassIndex: 1.5 })).toBe(a.key)
  })
  it('effective radiative efficiency qF/(1 − q + qF): 1 at q = 1, above q when F > 1', () => {
    expect(thinFilmAt(tf, 550, { glassIndex: 1.5 }).effectiveRadiativeEfficiency).toBe(1)
    const r = thinFilmAt({ ...tf, radiativeEfficiency: 0.7 }, 550, { glassIndex: 1.5 })
    expect(r.purcell.mixed).toBeGreaterThan(1)
    expect(r.effectiveRadiativeEfficiency).toBeGreaterThan(0.7)
    expect(r.effectiveRadiativeEfficiency).toBeLessThan(1)
  })
})

describe('thinFilmSchema: bad stacks get field-named messages in the trade\'s words', () => {
  const good: ThinFilmInput = { layers: [layer(100, 1.9, 0.01), layer(20, 1.75, 0, true), layer(50, 1.75)], cathode: { material: { n: 0.96, k: 6.69 } },
    emitterPositionNm: 10 }
  const fails = (input: unknown, path: (string | number)[], word: RegExp) => {
    const r = thinFilmSchema.safeParse(input)
    expect(r.success).toBe(false)
    const issue = r.error!.issues.find((i) => JSON.stringify(i.path) === JSON.stringify(path))
    expect(issue, JSON.stringify(r.error!.issues)).toBeDefined()
    expect(issue!.message).toMatch(word)
  }
  it('accepts the reference stack with isotropic orientation and q = 1 by default', () => {
    const r = thinFilmSchema.parse(good)
    expect(r.horizontalDipoleFraction).toBeCloseTo(2 / 3, 12)
    expect(r.radiativeEfficiency).toBe(1)
  })
  it('no emitting layer', () => fails({ ...good, layers: [layer(100, 1.9), layer(20, 1.75)] }, ['layers'], /no emitting layer/))
  it('two emitting layers', () => fails({ ...good, layers: [layer(100, 1.9, 0, true), layer(20, 1.75, 0, true)] }, ['layers', 1, 'emitting'], /2 emitting layers \(layers 1, 2, counted from the glass\)/))
  it('emitter position outside the emitting layer', () => fails({ ...good, emitterPositionNm: 25 }, ['emitterPositionNm'], /outside the emitting layer.*20 nm/))
  it('negative extinction coefficient', () => fails({ ...good, layers: [layer(100, 1.9, -0.01), layer(20, 1.75, 0, true)] }, ['layers', 0, 'material', 'k'], /must not be negative/))
  it('a layer thicker than 10 µm', () => fails({ ...good, layers: [layer(10_001, 1.9), layer(20, 1.75, 0, true)] }, ['layers', 0, 'thicknessNm'], /at most 10000 nm/))
  it('more than 30 layers', () => fails({ ...good, layers: [...Array.from({ length: 30 }, () => layer(10, 1.8)), layer(20, 1.75, 0, true)] }, ['layers'], /at most 30 layers/))
  it('an absorbing emitting layer', () => fails({ ...good, layers: [layer(100, 1.9), layer(20, 1.75, 0.01, true)] }, ['layers', 1, 'material', 'k'], /emitting layer must be non-absorbing/))
})
