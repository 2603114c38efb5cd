// Derived lens geometry and the core's lattice/cap intersection (standard geometry).
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import {
  cellAreaUm2, conicCurvaturePerUm, maxConicSagUm, conicSagUm, contactAngleDeg, diameterFromFillFactorUm, diameterFromRadiusAndSagUm,
  fillFactor, radiusOfCurvatureUm, sagFromRadiusUm,
} from '../../../shared/types/geometry'
import { capHit, capNormal, nearestSite } from '../../../shared/optics/geometry'
import { wrapToSite } from '../../../shared/optics/tracer'

describe('spherical cap (standard geometry)', () => {
  it('D 10 µm, h 2.5 µm → Rc 6.250 µm, contact angle 53.13°; hemisphere h = r, 90°', () => {
    expect(radiusOfCurvatureUm(10, 2.5)).toBeCloseTo(6.25, 10)
    expect(contactAngleDeg(10, 2.5)).toBeCloseTo(53.13, 2)
    expect(radiusOfCurvatureUm(10, 5)).toBeCloseTo(5, 12)
    expect(contactAngleDeg(10, 5)).toBeCloseTo(90, 10)
  })
  // Near the hemisphere (h → r) sag ↔ Rc is ill-conditioned (√(Rc² − r²) → 0): relative 1e-6 there is the
  // floating-point limit, not a model error.
  it('round trips sag ↔ radius ↔ diameter (property, seed 7)', () => {
    fc.assert(fc.property(fc.double({ min: 0.1, max: 1000, noNaN: true }), fc.double({ min: 1e-3, max: 1, noNaN: true }), (D, frac) => {
      const h = (frac * D) / 2
      const Rc = radiusOfCurvatureUm(D, h)
      expect(sagFromRadiusUm(D, Rc) / h).toBeCloseTo(1, 6)
      expect(diameterFromRadiusAndSagUm(Rc, h) / D).toBeCloseTo(1, 6)
    }), { seed: 7 })
  })
})

describe('fill factor (Conway & Sloane ch. 1)', () => {
  it('hexagonal π/(2√3)(D/p)² = 0.9069 at D = p; square π/4', () => {
    expect(fillFactor('hexagonal', 10, 10)).toBeCloseTo(0.9069, 4)
    expect(fillFactor('square', 10, 10)).toBeCloseTo(Math.PI / 4, 12)
    expect(fillFactor('hexagonal', 5, 10)).toBeCloseTo(0.9069 / 4, 4)
    // one base disc per cell: πr²/cell area
    expect(fillFactor('hexagonal', 7, 9)).toBeCloseTo((Math.PI * 3.5 ** 2) / cellAreaUm2('hexagonal', 9), 12)
  })
  it('round trips diameter ↔ fill factor (property, seed 11)', () => {
    fc.assert(fc.property(fc.constantFrom('hexagonal' as const, 'square' as const), fc.double({ min: 0.01, max: 1, noNaN: true }), fc.double({ min: 0.5, max: 500, noNaN: true }), (lat, q, p) => {
      const D = q * p
      expect(diameterFromFillFactorUm(lat, fillFactor(lat, D, p), p) / D).toBeCloseTo(1, 10)
    }), { seed: 11 })
  })
})

describe('conic cap through c = 2h/(a² + (1+k)h²) (derived in shared/types/geometry.ts)', () => {
  it('sag(a) = h for spheres, paraboloids, hyperboloids and ellipsoids (property, seed 5)', () => {
    fc.assert(fc.property(fc.double({ min: 1, max: 100, noNaN: true }), fc.double({ min: 0.01, max: 1, noNaN: true }), fc.double({ min: -5, max: 3,
      noNaN: true }), (D, frac, k) => {
      const a = D / 2
      const hMax = k === -1 ? 10 * a : 0.999 * maxConicSagUm(D, k)
      const h = frac * Math.min(hMax, 2 * a)
      const c = conicCurvaturePerUm(D, h, k)
      expect(conicSagUm(a, c, k) / h).toBeCloseTo(1, 6) // √(1 − (1+k)c²a²) → 0 at the branch point
    }), { seed: 5 })
  })
  it('sphere: c = 1/Rc', () => {
    expect(conicCurvaturePerUm(10, 2.5, 0)).toBeCloseTo(1 / 6.25, 12)
  })
})

describe('core lattice and cap intersection', () => {
  it('nearestSite agrees with a brute-force search (hexagonal and square, seed 3)', () => {
    const out = new Float64Array(4)
    fc.assert(fc.property(fc.boolean(), fc.double({ min: -100, max: 100, noNaN: true }), fc.double({ min: -100, max: 100, noNaN: true }), (hex, x, y) => {
      const p = 7
      nearestSite(hex, p, x, y, out)
      let best = Infinity
      for (let i = -30; i <= 30; i++) for (let j = -30; j <= 30; j++) {
        const sx = hex ? (i + j / 2) * p : i * p, sy = hex ? (j * p * Math.sqrt(3)) / 2 : j * p
        best = Math.min(best, (x - sx) ** 2 + (y - sy) ** 2)
      }
      expect((x - out[0]!) ** 2 + (y - out[1]!) ** 2).toBeCloseTo(best, 8)
    }), { seed: 3 })
  })
  it('capHit lands on the surface, within the cap, and the normal is the surface gradient (seed 9)', () => {
    const n = new Float64Array(3)
    fc.assert(fc.property(fc.double({ min: -0.99, max: 0.99, noNaN: true }), fc.double({ min: -0.99, max: 0.99, noNaN: true }), fc.double({ min: -1, max: 2,
      noNaN: true }),
      fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }), fc.double({ min: 0.05, max: 1, noNaN: true }), (u, v, k, phi, mu) => {
        // a ray from a point inside the base disc, going up
        const D = 10, a = 5, t = 3
        const h = k > -1 ? Math.min(4, a / Math.sqrt(1 + k)) * 0.9 : 4
        const c = conicCurvaturePerUm(D, h, k)
        const x = u * a * Math.SQRT1_2, y = v * a * Math.SQRT1_2
        const s = Math.sqrt(1 - mu * mu)
        const dx = s * Math.cos(phi), dy = s * Math.sin(phi), dz = mu
        const tau = capHit(x, y, t, dx, dy, dz, t + h, c, 1 + k, h, false)
        if (tau < 0) return // exits through... nothing: an upgoing ray from inside must hit the cap
        const X = x + tau * dx, Y = y + tau * dy, Z = t + tau * dz
        const rho = Math.hypot(X, Y)
        expect(rho).toBeLessThanOrEqual(a + 1e-9)
        expect(t + h - Z).toBeCloseTo(conicSagUm(rho, c, k), 8)
        capNormal(X, Y, Z, t + h, c, 1 + k, n)
        expect(Math.hypot(n[0]!, n[1]!, n[2]!)).toBeCloseTo(1, 12)
        expect(n[2]).toBeGreaterThan(0)
        // re-launching from the hit along the same direction finds no second crossing
        expect(capHit(X, Y, Z, dx, dy, dz, t + h, c, 1 + k, h, true)).toBeLessThan(1e-9)
      }), { seed: 9 })
  })
  it('an upgoing ray from inside the base disc always meets the cap (seed 13)', () => {
    fc.assert(fc.property(fc.double({ min: -0.7, max: 0.7, noNaN: true }), fc.double({ min: -0.7, max: 0.7, noNaN: true }), fc.double({ min: 0.01, max: 1,
      noNaN: true }), fc.double({ min: 0, max: 6.28, noNaN: true }), (u, v, mu, phi) => {
      const s = Math.sqrt(1 - mu * mu)
      const c = conicCurvaturePerUm(10, 5, 0)
      expect(capHit(u * 5, v * 5, 0, s * Math.cos(phi), s * Math.sin(phi), mu, 5, c, 1, 5, false)).toBeGreaterThan(0)
    }), { seed: 13 })
  })
})

describe('tracer wrap to the nearest site (two rectangular sublattices) agrees with nearestSite (seed 17)', () => {
  it('hexagonal and square, far from the origin too', () => {
    const a = new Float64Array(4), b = new Float64Array(3)
    fc.assert(fc.property(fc.boolean(), fc.double({ min: -1e4, max: 1e4, noNaN: true }), fc.double({ min: -1e4, max: 1e4, noNaN: true }), fc.double({ min: 0.5,
      max: 50, noNaN: true }), (hex, x, y, p) => {
      nearestSite(hex, p, x, y, a)
      wrapToSite(hex, p, p * Math.sqrt(3), x, y, b)
      const da = (x - a[0]!) ** 2 + (y - a[1]!) ** 2, db = (x - b[1]!) ** 2 + (y - b[2]!) ** 2
      expect(db).toBeCloseTo(da, 6) // ties may pick either site: compare distances
    }), { seed: 17, numRuns: 2000 })
  })
})
