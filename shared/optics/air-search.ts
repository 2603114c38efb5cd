// The air search: a ray in air below the cap tops, what does it meet first (shared by the fused loop in tracer.ts
// and the air step of the readable model in steps.ts).
import { capHit, HEX_ROW_FACTOR } from './geometry'
import { measuredCapHit } from './measured-cap'

/** Air search gives up (ray unresolved) after this many half-pitch steps: only grazing rays in sparse arrays. */
const MAX_AIR_STEPS = 1 << 14

/** Where airSearch writes its hit: [τ, siteX, siteY] (τ for a cap or the land). */
export const airHit = new Float64Array(3)
const hit = airHit
const tested = new Int32Array(16)
/** The scene being traced has measured caps (measured-cap.ts); set with setAirSearchMeasured before tracing. */
let measuredScene = false

export function setAirSearchMeasured(measured: boolean): void {
  measuredScene = measured
}

/** Ends of airSearch. */
export const AIR_ESCAPE = 0
export const AIR_CAP = 1
export const AIR_LAND = 2
export const AIR_LOST = 3

/**
 * Test access to the air search: returns the end kind and writes [τ, siteX, siteY] into `out` (τ for a cap or the
 * land). Geometry arguments as in the packed scene (µm; c in 1/µm; k1 = 1 + conic constant).
 */
export function findAirHit(x: number, y: number, z: number, dx: number, dy: number, dz: number, excludeSelf: boolean,
  hexagonal: boolean, pitchUm: number, lensRadiusUm: number, sagUm: number, thicknessUm: number, cPerUm: number, k1: number,
  out: Float64Array): number {
  const kind = airSearch(x, y, z, dx, dy, dz, excludeSelf, hexagonal, pitchUm, lensRadiusUm, sagUm, thicknessUm, cPerUm, k1)
  out[0] = hit[0]!; out[1] = hit[1]!; out[2] = hit[2]!
  return kind
}

/**
 * Follows a ray in air below the cap tops (t ≤ z ≤ t + h) and finds what it meets first: a cap (hit = [τ, sx, sy]),
 * the flat land (hit[0] = τ) or nothing (escape). Coordinates are relative to the current site (the origin), whose
 * cap is skipped when `excludeSelf` (the ray has just left or bounced off it).
 * Search: sample the horizontal path every δ = p/2; at each sample test the sites of the containing lattice
 * triangle (hexagonal) or square that lie within R = √(a² + δ²/4): any cap the path crosses has its site within a
 * of the path, hence within R of the nearest sample, and every site within R < p/√3 of a point is a vertex of the
 * point's triangle/square (a ≤ p/2). A hit at horizontal distance s* is final once the samples pass s* + a + δ/2
 * (no untested cap can be met before that).
 */
export function airSearch(x: number, y: number, z: number, dx: number, dy: number, dz: number, excludeSelf: boolean,
  hex: boolean, pitch: number, aUm: number, hUm: number, tUm: number, cv: number, k1: number): number {
  const zTop = tUm + hUm
  if (dz >= 0 && z >= zTop) return AIR_ESCAPE
  const tz = dz > 0 ? (zTop - z) / dz : dz < 0 ? (tUm - z) / dz : Infinity
  const hs = Math.sqrt(dx * dx + dy * dy)
  const step = 0.5 * pitch
  let lh = hs * tz
  if (!(hs > 0)) lh = 0
  let truncated = false
  if (!(lh <= MAX_AIR_STEPS * step)) { lh = MAX_AIR_STEPS * step; truncated = true }
  const r2 = aUm * aUm + 0.25 * step * step
  // (a·|d_xy|)², with a 1e-9 relative allowance so rays grazing a rim are still handed to the exact test
  const a2h2 = aUm * aUm * (dx * dx + dy * dy) * (1 + 1e-9)
  const margin = aUm + 0.5 * step
  const rowUm = pitch * HEX_ROW_FACTOR
  const invHs = hs > 0 ? 1 / hs : 0
  let best = Infinity, bsx = 0, bsy = 0
  let nTested = 0
  for (let k = 0; ; k++) {
    let s = k * step
    if (s > lh) s = lh
    const tk = s * invHs
    const px = x + dx * tk, py = y + dy * tk
    let i0: number, j0: number, upper = false
    if (hex) {
      const v = py / rowUm, u = px / pitch - 0.5 * v
      i0 = Math.floor(u); j0 = Math.floor(v)
      upper = u - i0 + (v - j0) >= 1
    } else {
      i0 = Math.floor(px / pitch); j0 = Math.floor(py / pitch)
    }
    const nv = hex ? 3 : 4
    for (let m = 0; m < nv; m++) {
      let i: number, j: number
      if (hex) {
        if (upper) { i = m === 1 ? i0 : i0 + 1; j = m === 2 ? j0 : j0 + 1 } // (1,1) (0,1) (1,0)
        else { i = m === 1 ? i0 + 1 : i0; j = m === 2 ? j0 + 1 : j0 } // (0,0) (1,0) (0,1)
      } else { i = i0 + (m & 1); j = j0 + (m >> 1) }
      if (excludeSelf && i === 0 && j === 0) continue
      const sx = hex ? (i + 0.5 * j) * pitch : i * pitch
      const sy = hex ? j * rowUm : j * pitch
      const ex = px - sx, ey = py - sy
      if (ex * ex + ey * ey > r2) continue
      // cheap rejections before the quadric: the site's disc must reach the ray's horizontal line, ahead of the start
      const wx = sx - x, wy = sy - y
      const cross = wx * dy - wy * dx, along = wx * dx + wy * dy
      if (cross * cross > a2h2 || along < -aUm * hs) continue
      // each site once per search (a ring of the last 8 tested is enough: a site stays within R for ≤ 4 samples)
      let seen = false
      const lim = nTested < 8 ? nTested : 8
      for (let q = 0; q < lim; q++) if (tested[2 * q] === i && tested[2 * q + 1] === j) { seen = true; break }
      if (seen) continue
      const slot = nTested & 7
      tested[2 * slot] = i; tested[2 * slot + 1] = j
      nTested++
      const tau = measuredScene ? measuredCapHit(x - sx, y - sy, z, dx, dy, dz, zTop, false) : capHit(x - sx, y - sy, z, dx, dy, dz, zTop, cv, k1, hUm, false)
      if (tau > 0 && tau < best) { best = tau; bsx = sx; bsy = sy }
    }
    if (best < Infinity && s > best * hs + margin) break
    if (s >= lh) break
  }
  if (best < Infinity) { hit[0] = best; hit[1] = bsx; hit[2] = bsy; return AIR_CAP }
  if (truncated) return AIR_LOST
  if (dz > 0) return AIR_ESCAPE
  hit[0] = tz
  return AIR_LAND
}
