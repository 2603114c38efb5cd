// The monotone profile interpolant (Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238 (1980)): it passes through the
// knots, never leaves the range of neighbouring knots (no overshoot), stays monotone, and reproduces a smooth cap.
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { buildProfile, evalProfile, measuredSagUm } from '../../../shared/optics/profile'
import { measuredCapHit, measuredCapNormal, setMeasuredCap } from '../../../shared/optics/measured-cap'

const out = new Float64Array(2)

// Falling heights from a centre at ρ = 0: sorted distinct radii, non-increasing heights, centre above rim.
const profileArb = fc.tuple(
  fc.uniqueArray(fc.integer({ min: 1, max: 10_000 }), { minLength: 2, maxLength: 30 }),
  fc.array(fc.integer({ min: 0, max: 1000 }), { minLength: 31, maxLength: 31 }),
).map(([radii, drops]) => {
  const r = [0, ...radii.sort((x, y) => x - y)].map((v) => v / 100)
  let z = 1 + drops.reduce((s, d) => s + d, 0) / 100
  const rows: Array<[number, number]> = r.map((rr, i) => {
    if (i > 0) z -= drops[i]! / 100
    return [rr, z]
  })
  rows[rows.length - 1]![1] = Math.min(rows[rows.length - 1]![1], rows[0]![1] - 0.5)
  return rows
})

describe('monotone profile interpolant', () => {
  it('passes through the knots and is monotone without overshoot (property)', () => {
    fc.assert(fc.property(profileArb, (rows) => {
      const p = buildProfile(rows)
      for (let i = 0; i < p.u.length; i++) {
        evalProfile(p, p.u[i]!, out)
        if (Math.abs(out[0]! - p.w[i]!) > 1e-12) return false
      }
      let prev = -Infinity
      for (let k = 0; k <= 2000; k++) {
        evalProfile(p, k / 2000, out)
        if (out[0]! < prev - 1e-12 || out[0]! < -1e-12 || out[0]! > 1 + 1e-12) return false
        prev = out[0]!
      }
      return true
    }), { seed: 4711, numRuns: 200 })
  })

  it('a control that must fail: unclamped Catmull-Rom tangents overshoot on a step profile', () => {
    // Step data (flat, drop, flat): the Fritsch–Carlson limiter is what keeps w in [0, 1] here.
    const rows: Array<[number, number]> = [[0, 2], [1, 2], [1.1, 0.05], [2, 0]]
    const p = buildProfile(rows)
    let max = 0
    for (let k = 0; k <= 1000; k++) { evalProfile(p, k / 1000, out); max = Math.max(max, out[0]!) }
    expect(max).toBeLessThanOrEqual(1 + 1e-12)
    // Replace the limited tangents by plain secant means and the same data overshoots (so the check above can fail).
    const naive = { ...p, m: p.m.slice() }
    naive.m[2] = 0.5 * ((p.w[2]! - p.w[1]!) / (p.u[2]! - p.u[1]!) + (p.w[3]! - p.w[2]!) / (p.u[3]! - p.u[2]!))
    let naiveMax = 0
    for (let k = 0; k <= 1000; k++) { evalProfile(naive, k / 1000, out); naiveMax = Math.max(naiveMax, out[0]!) }
    expect(naiveMax).toBeGreaterThan(1)
  })

  it('reproduces a spherical cap sampled at 101 rows to 5e-4 µm, worst near the steep rim (D 10 µm, sag 3 µm; standard cap geometry)', () => {
    const a = 5, h = 3, Rc = (a * a + h * h) / (2 * h)
    const rows = Array.from({ length: 101 }, (_, i) => { const r = (a * i) / 100; return [r, Math.sqrt(Rc * Rc - r * r) - (Rc - h)] as [number, number] })
    const p = buildProfile(rows)
    for (let k = 0; k <= 997; k++) {
      const r = (a * k) / 997
      // Arithmetic-mean tangents are second-order, so the value error is third-order in the row spacing (0.05 µm).
      expect(Math.abs(measuredSagUm(p, r, a, h) - (Rc - Math.sqrt(Rc * Rc - r * r)))).toBeLessThan(5e-4)
    }
  })

  it('ray hits and normals of a sampled sphere agree with the sphere (vertical and oblique rays)', () => {
    const a = 5, h = 3, Rc = (a * a + h * h) / (2 * h), zv = 10
    const rows = Array.from({ length: 201 }, (_, i) => { const r = (a * i) / 200; return [r, Math.sqrt(Rc * Rc - r * r) - (Rc - h)] as [number, number] })
    setMeasuredCap(buildProfile(rows), a, h)
    try {
      const n = new Float64Array(3)
      for (const x of [0, 1, 2.5, 4]) {
        // A vertical ray from above meets the sphere at z = zv − (Rc − √(Rc² − x²)).
        const tau = measuredCapHit(x, 0, 20, 0, 0, -1, zv, false)
        expect(20 - tau).toBeCloseTo(zv - (Rc - Math.sqrt(Rc * Rc - x * x)), 4)
        measuredCapNormal(x, 0, n)
        // Sphere normal at (x, z): (x, 0, z − (zv − Rc))/Rc.
        expect(n[0]!).toBeCloseTo(x / Rc, 3)
      }
      // From inside at the base going up-and-out, the exit point lies on the sphere.
      const dx = 0.6, dz = 0.8
      const t = measuredCapHit(0, 0, zv - h, dx, 0, dz, zv, false)
      const X = dx * t, Z = zv - h + dz * t
      expect(X * X + (Z - (zv - Rc)) ** 2).toBeCloseTo(Rc * Rc, 3)
      // A ray passing beside the cap misses it.
      expect(measuredCapHit(6, 0, 20, 0, 0, -1, zv, false)).toBe(-1)
    } finally {
      setMeasuredCap(null)
    }
  })
})
