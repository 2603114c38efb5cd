// The neighbour search in air against brute force over every site within reach (common practice: an exhaustive
// reference for an accelerated search). Random rays leave a cap surface or the land, in hexagonal and square
// lattices, close-packed and sparse, spherical and conic caps.
import { describe, expect, it } from 'vitest'
import { createRngState, nextUniform, seedRay } from '../../../shared/optics/rng'
import { conicCurvaturePerUm } from '../../../shared/types/geometry'
import { capHit } from '../../../shared/optics/geometry'
import { AIR_CAP, AIR_ESCAPE, AIR_LAND, findAirHit } from '../../../shared/optics/tracer'

function bruteForce(x: number, y: number, z: number, dx: number, dy: number, dz: number, excludeSelf: boolean,
  hex: boolean, p: number, a: number, h: number, t: number, c: number, k1: number): { kind: number; tau: number; sx: number; sy: number } {
  let best = Infinity, bsx = 0, bsy = 0
  const reach = 60
  for (let i = -reach; i <= reach; i++) for (let j = -reach; j <= reach; j++) {
    if (excludeSelf && i === 0 && j === 0) continue
    const sx = hex ? (i + j / 2) * p : i * p, sy = hex ? (j * p * Math.sqrt(3)) / 2 : j * p
    const tau = capHit(x - sx, y - sy, z, dx, dy, dz, t + h, c, k1, h, false)
    if (tau > 0 && tau < best) { best = tau; bsx = sx; bsy = sy }
  }
  if (best < Infinity) return { kind: AIR_CAP, tau: best, sx: bsx, sy: bsy }
  if (dz > 0) return { kind: AIR_ESCAPE, tau: 0, sx: 0, sy: 0 }
  return { kind: AIR_LAND, tau: (t - z) / dz, sx: 0, sy: 0 }
}

describe('air search finds the first cap or the land, like brute force (seed 21, 4000 rays)', () => {
  it('rays from a cap surface and from the land', { timeout: 30_000 }, () => {
    const out = new Float64Array(3)
    const st = createRngState()
    const tally = [0, 0, 0, 0]
    let farHits = 0
    for (let n = 0; n < 4000; n++) {
      seedRay(st, 21, 0, n)
      const u = () => nextUniform(st)
      const hex = u() < 0.5, q = 0.5 + 0.5 * u(), hf = 0.1 + 0.9 * u()
      const k = [0, -1, -2, 1][Math.floor(4 * u())]!
      const fromCap = u() < 0.6
      const psi = 2 * Math.PI * u(), rhoFrac = u(), phi = 2 * Math.PI * u()
      let mu = -0.6 + 1.2 * u()
      if (Math.abs(mu) < 1e-3) continue // near-horizontal rays: very long marches, covered by the march limit
      const p = 10, a = (q * p) / 2, t = 50
      const hMax = k > -1 ? a / Math.sqrt(1 + k) : k < -1 ? (0.99 * a) / Math.sqrt(-1 - k) : 2 * a
      const h = Math.min(hMax, 2 * a) * hf
      const c = conicCurvaturePerUm(2 * a, h, k), k1 = 1 + k
      let x: number, y: number, z: number
      if (fromCap) {
        // a point on the origin cap
        const rho = a * rhoFrac * 0.999
        const s = (c * rho * rho) / (1 + Math.sqrt(Math.max(0, 1 - k1 * c * c * rho * rho)))
        x = rho * Math.cos(psi); y = rho * Math.sin(psi); z = t + h - s
      } else {
        // a point of the land outside the origin disc, inside its cell's inscribed circle
        const rho = a + (p / 2 - a) * rhoFrac + 1e-6
        x = rho * Math.cos(psi); y = rho * Math.sin(psi); z = t
        if (mu < 0) mu = -mu
      }
      const sn = Math.sqrt(1 - mu * mu)
      const dx = sn * Math.cos(phi), dy = sn * Math.sin(phi), dz = mu
      const kind = findAirHit(x, y, z, dx, dy, dz, fromCap, hex, p, a, h, t, c, k1, out)
      const ref = bruteForce(x, y, z, dx, dy, dz, fromCap, hex, p, a, h, t, c, k1)
      tally[kind] = tally[kind]! + 1
      // a ray leaving the origin cap outward cannot hit it again (convex), so excluding it loses nothing
      expect(kind, `ray ${n}`).toBe(ref.kind)
      if (kind === AIR_CAP) {
        if (Math.hypot(ref.sx, ref.sy) > 1.5 * p) farHits++
        expect(out[0]! / ref.tau).toBeCloseTo(1, 9)
        expect(out[1]).toBeCloseTo(ref.sx, 9)
        expect(out[2]).toBeCloseTo(ref.sy, 9)
      }
      if (kind === AIR_LAND) expect(out[0]! / ref.tau).toBeCloseTo(1, 9)
    }
    // the sample must exercise all three ends and caps beyond the nearest ring
    expect(Math.min(tally[AIR_CAP]!, tally[AIR_LAND]!, tally[AIR_ESCAPE]!)).toBeGreaterThan(200)
    expect(farHits).toBeGreaterThan(50)
  })
})
