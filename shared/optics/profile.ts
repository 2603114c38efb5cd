// Measured lens profiles: a table of (radial position ρ, height z) from a profilometer, turned into a smooth,
// monotone sag function by monotone cubic Hermite interpolation (Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238
// (1980)): the interpolant never overshoots the data, so a falling trace gives a falling surface without ripples.
// The table fixes the shape; the lens array's diameterUm and sagUm scale it (ρ by a/ρ_last, heights by
// h/(z_0 − z_last)), so a measured shape can be swept like any other. Units: µm; s(ρ) is the depth below the
// vertex (0 at the centre, h at the rim), the convention of geometry.ts.

export interface MonotoneProfile {
  /** Normalised knots: u = ρ/ρ_last in [0, 1], w = (z_0 − z)/(z_0 − z_last) in [0, 1], w non-decreasing. */
  u: Float64Array
  w: Float64Array
  /** Hermite tangents dw/du at the knots. */
  m: Float64Array
}

/** Builds the normalised monotone interpolant of a table [[rhoUm, heightUm], ...] (ρ increasing from 0, z falling). */
export function buildProfile(table: ReadonlyArray<readonly [number, number] | readonly number[]>): MonotoneProfile {
  const n = table.length
  const r0 = table[0]![0]!, rN = table[n - 1]![0]!
  const z0 = table[0]![1]!, zN = table[n - 1]![1]!
  const u = new Float64Array(n), w = new Float64Array(n), m = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    u[i] = (table[i]![0]! - r0) / (rN - r0)
    w[i] = (z0 - table[i]![1]!) / (z0 - zN)
  }
  const d = new Float64Array(n - 1)
  for (let i = 0; i < n - 1; i++) d[i] = (w[i + 1]! - w[i]!) / (u[i + 1]! - u[i]!)
  // Interior tangents: mean of the neighbouring secants, 0 where the data has a flat step or an extremum.
  m[0] = d[0]!
  m[n - 1] = d[n - 2]!
  for (let i = 1; i < n - 1; i++) m[i] = d[i - 1]! * d[i]! <= 0 ? 0 : 0.5 * (d[i - 1]! + d[i]!)
  // A measured cap is smooth at its apex: zero slope at ρ = 0 (the mirror image has the opposite slope).
  m[0] = 0
  for (let i = 0; i < n - 1; i++) {
    if (d[i] === 0) { m[i] = 0; m[i + 1] = 0; continue }
    const a = m[i]! / d[i]!, b = m[i + 1]! / d[i]!
    const s = a * a + b * b
    // Fritsch–Carlson: (α, β) inside the circle of radius 3 keeps the cubic monotone.
    if (s > 9) {
      const t = 3 / Math.sqrt(s)
      m[i] = t * a * d[i]!
      m[i + 1] = t * b * d[i]!
    }
  }
  return { u, w, m }
}

/** Interval index k with u[k] ≤ x ≤ u[k+1] (binary search; x clamped to [0, 1]). */
function interval(p: MonotoneProfile, x: number): number {
  let lo = 0, hi = p.u.length - 1
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1
    if (p.u[mid]! <= x) lo = mid
    else hi = mid
  }
  return lo
}

/** Normalised depth w(x) and its slope dw/dx at x ∈ [0, 1]; writes [w, dw/dx] into out. */
export function evalProfile(p: MonotoneProfile, x: number, out: Float64Array): void {
  const xc = x < 0 ? 0 : x > 1 ? 1 : x
  const k = interval(p, xc)
  const h = p.u[k + 1]! - p.u[k]!
  const t = (xc - p.u[k]!) / h
  const t2 = t * t, t3 = t2 * t
  const w0 = p.w[k]!, w1 = p.w[k + 1]!, m0 = p.m[k]! * h, m1 = p.m[k + 1]! * h
  out[0] = (2 * t3 - 3 * t2 + 1) * w0 + (t3 - 2 * t2 + t) * m0 + (-2 * t3 + 3 * t2) * w1 + (t3 - t2) * m1
  out[1] = ((6 * t2 - 6 * t) * w0 + (3 * t2 - 4 * t + 1) * m0 + (-6 * t2 + 6 * t) * w1 + (3 * t2 - 2 * t) * m1) / h
}

/** Depth below the vertex s(ρ) in µm of a measured cap scaled to base radius aUm and sag hUm. */
export function measuredSagUm(p: MonotoneProfile, rhoUm: number, aUm: number, hUm: number, scratch = new Float64Array(2)): number {
  evalProfile(p, rhoUm / aUm, scratch)
  return scratch[0]! * hUm
}
