// Caps of a measured profile (lens shape "measured"): a surface of revolution z = zv − h·w(ρ/a) over the base disc
// ρ ≤ a, w the monotone interpolant of profile.ts (w(0) = 0 at the vertex, w(1) = 1 at the rim). Frame and units
// as geometry.ts (z up, µm, coordinates relative to the cap's site, vertex at (0, 0, zv)).
//
// Intersection: with g(τ) = z(τ) − z_surface(ρ(τ)) (< 0 inside the lens, > 0 in the air; continued as z − (zv − h)
// outside the base disc, which meets the cap continuously at the rim), the hit is the first sign change of g along
// the ray inside the cylinder ρ ≤ a and the slab zv − h ≤ z ≤ zv. It is bracketed on MARCH_STEPS equal steps and
// refined by bisection to double precision. A ray that enters and leaves the cap within one step (a graze shorter
// than 1/64 of the chord) is missed, a bias far below Monte Carlo noise for smooth profiles.
// Normal: ∇(z − zv + h·w(ρ/a)) = ((h/a)·w′·x/ρ, (h/a)·w′·y/ρ, 1), outward (out of the lens), w′(0) = 0 at the apex.
// The tracer's air search skips the cap a ray just left (a convex cap cannot be met twice); a measured profile with
// an inflection may in rare cases be met twice, which this model then misses.
// Profile of the scene in use: set by traceRange once per call (one scene at a time per thread, like the tracer's
// own module scratch). The tracer calls measuredCapHit instead of geometry.ts's capHit for such a scene; the quadric
// code is untouched (a flag test inside capHit cost the brute-force air-search test 1.5× under vitest).
import { evalProfile, type MonotoneProfile } from './profile'

const MARCH_STEPS = 64
const BISECTIONS = 52

let active: MonotoneProfile | null = null
let aUm = 1, hUm = 1
const ev = new Float64Array(2)
/** Normal scratch of the on-surface start test (ev is the profile's). */
const nrm = new Float64Array(3)

/** Makes `p` the cap profile of the scene being traced (null for quadric caps). */
export function setMeasuredCap(p: MonotoneProfile | null, lensRadiusUm = 1, sagUm = 1): void {
  active = p
  aUm = lensRadiusUm
  hUm = sagUm
}

function gAt(px: number, py: number, pz: number, dx: number, dy: number, dz: number, zv: number, tau: number): number {
  const x = px + dx * tau, y = py + dy * tau, z = pz + dz * tau
  const rho = Math.sqrt(x * x + y * y)
  if (rho >= aUm) return z - (zv - hUm)
  evalProfile(active!, rho / aUm, ev)
  return z - (zv - hUm * ev[0]!)
}

/** Smallest τ > 0 where the ray meets the measured cap with vertex (0, 0, zv), or −1 (see the header). */
export function measuredCapHit(px: number, py: number, pz: number, dx: number, dy: number, dz: number, zv: number, onSurface: boolean): number {
  // τ range inside the slab zv − h ≤ z ≤ zv
  let lo = 0, hi = Infinity
  const zb = zv - hUm
  if (dz !== 0) {
    const t1 = (zb - pz) / dz, t2 = (zv - pz) / dz
    lo = Math.max(lo, Math.min(t1, t2)); hi = Math.min(hi, Math.max(t1, t2))
  } else if (pz < zb || pz > zv) return -1
  // and inside the cylinder ρ ≤ a: (dx²+dy²)τ² + 2(p·d)τ + |p|² − a² ≤ 0
  const A = dx * dx + dy * dy, B = px * dx + py * dy, C = px * px + py * py - aUm * aUm
  if (A > 0) {
    const disc = B * B - A * C
    if (disc <= 0) return -1
    const sq = Math.sqrt(disc)
    lo = Math.max(lo, (-B - sq) / A); hi = Math.min(hi, (-B + sq) / A)
  } else if (C > 0) return -1
  if (!(hi > lo)) return -1
  // A ray starting on the surface: skip the start root (1e-9·a is far above rounding, far below any feature).
  const skip = onSurface ? 1e-9 * aUm : 0
  const start = Math.max(lo, skip)
  if (!(hi > start)) return -1
  let s0: number
  if (onSurface && lo <= skip) {
    // Leaving the start point: inside the lens when the ray heads against the outward normal.
    measuredCapNormal(px, py, nrm)
    const nx = nrm[0]!, ny = nrm[1]!, nz = nrm[2]!
    s0 = dx * nx + dy * ny + dz * nz < 0 ? -1 : 1
  } else {
    const g0 = gAt(px, py, pz, dx, dy, dz, zv, start)
    if (g0 === 0) return start > 0 ? start : -1
    s0 = g0 < 0 ? -1 : 1
  }
  const step = (hi - start) / MARCH_STEPS
  let ta = start
  for (let k = 1; k <= MARCH_STEPS; k++) {
    const tb = k === MARCH_STEPS ? hi : start + k * step
    const gb = gAt(px, py, pz, dx, dy, dz, zv, tb)
    if ((gb < 0 ? -1 : 1) !== s0 || gb === 0) {
      let l = ta, r = tb
      for (let i = 0; i < BISECTIONS && r - l > 1e-15 * (r + 1); i++) {
        const m = 0.5 * (l + r)
        const gm = gAt(px, py, pz, dx, dy, dz, zv, m)
        if ((gm < 0 ? -1 : 1) === s0 && gm !== 0) l = m
        else r = m
      }
      const tau = 0.5 * (l + r)
      return tau > 0 ? tau : -1
    }
    ta = tb
  }
  return -1
}

/** Outward unit normal of the measured cap at lateral position (x, y) relative to its site; writes [nx, ny, nz]. */
export function measuredCapNormal(x: number, y: number, out: Float64Array): void {
  const rho = Math.sqrt(x * x + y * y)
  if (rho === 0) { out[0] = 0; out[1] = 0; out[2] = 1; return }
  evalProfile(active!, rho < aUm ? rho / aUm : 1, ev)
  const slope = (hUm / aUm) * ev[1]! / rho
  const nx = slope * x, ny = slope * y
  const inv = 1 / Math.sqrt(nx * nx + ny * ny + 1)
  out[0] = nx * inv; out[1] = ny * inv; out[2] = inv
}
