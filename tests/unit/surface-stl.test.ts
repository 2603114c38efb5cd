// STL facet normals of the mastering patch (server/utils/surface.ts): unit length, pointing out of the film (+z),
// (0, 0, 1) on the flat land, and on a hemispherical cap of radius R the outward sphere normal (p − c)/R at the
// facet (standard geometry), to within the grid's facet size.
import { describe, expect, it } from 'vitest'
import { surfaceStl } from '../../server/utils/surface'

const lens = { lattice: 'square' as const, pitchUm: 12, diameterUm: 10, sagUm: 5, shape: 'spherical' }

function facets(buf: Buffer) {
  const n = buf.readUInt32LE(80)
  const out: Array<{ n: number[]; v: number[][] }> = []
  for (let i = 0; i < n; i++) {
    const o = 84 + 50 * i
    const f = (k: number) => buf.readFloatLE(o + 4 * k)
    out.push({ n: [f(0), f(1), f(2)], v: [[f(3), f(4), f(5)], [f(6), f(7), f(8)], [f(9), f(10), f(11)]] })
  }
  return out
}

describe('STL facet normals', () => {
  const all = facets(surfaceStl(lens, 2, 2, 48))

  it('are unit vectors pointing up, and agree with the cross product of the stored vertices', () => {
    expect(all.length).toBe(2 * 96 * 96)
    for (const { n, v } of all) {
      expect(Math.hypot(n[0]!, n[1]!, n[2]!)).toBeCloseTo(1, 5)
      expect(n[2]!).toBeGreaterThan(0)
      const u = [0, 1, 2].map((k) => v[1]![k]! - v[0]![k]!), w = [0, 1, 2].map((k) => v[2]![k]! - v[0]![k]!)
      const c = [u[1]! * w[2]! - u[2]! * w[1]!, u[2]! * w[0]! - u[0]! * w[2]!, u[0]! * w[1]! - u[1]! * w[0]!]
      const l = Math.hypot(c[0]!, c[1]!, c[2]!)
      for (let k = 0; k < 3; k++) expect(Math.abs(n[k]! - c[k]! / l)).toBeLessThan(2e-3)
    }
  })

  it('land facets face straight up; cap facets follow the hemisphere\'s normal (R = 5 µm, centre on the land)', () => {
    let land = 0, cap = 0
    const R = 5
    for (const { n, v } of all) {
      const cx = (v[0]![0]! + v[1]![0]! + v[2]![0]!) / 3, cy = (v[0]![1]! + v[1]![1]! + v[2]![1]!) / 3, cz = (v[0]![2]! + v[1]![2]! + v[2]![2]!) / 3
      const sx = Math.round(cx / 12) * 12, sy = Math.round(cy / 12) * 12
      const rho = Math.max(...v.map((p) => Math.hypot(p[0]! - sx, p[1]! - sy)))
      if (v.every((p) => p[2] === 0) && Math.min(...v.map((p) => Math.hypot(p[0]! - sx, p[1]! - sy))) > R) {
        expect(n).toEqual([0, 0, 1]); land++
      } else if (rho < 0.8 * R) {
        const len = Math.hypot(cx - sx, cy - sy, cz)
        const dot = (n[0]! * (cx - sx) + n[1]! * (cy - sy) + n[2]! * cz) / len
        expect(dot).toBeGreaterThan(0.999)
        cap++
      }
    }
    expect(land).toBeGreaterThan(1000)
    expect(cap).toBeGreaterThan(1000)
  })
})
