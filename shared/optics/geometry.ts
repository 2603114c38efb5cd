// Lens lattice and cap profiles. Frame: z up; the substrate's top face is the plane z = t; a cap of base radius
// a = D/2 and sag h sits on every lattice site with its vertex at z = t + h. Lengths in µm.
//
// Lattices (lattice.ts): hexagonal with site vectors (p, 0), (p/2, p√3/2); square with (p, 0), (0, p).
// Because D ≤ p, every base disc lies inside its site's Voronoi cell (inradius p/2), so "which cap is above this
// point of the face" is "the nearest site's cap, if within a".
//
// Profiles (all one family): s(ρ) = cρ²/(1 + √(1 − (1+k)c²ρ²)), s measured down from the vertex; sphere k = 0,
// paraboloid k = −1. Requiring s(a) = h in the implicit form F = cρ² − 2s + (1+k)c·s² = 0 gives
// c = 2h/(a² + (1+k)h²) (shared/types/geometry.ts). F < 0 inside the lens, ∇F points out of the lens:
// n ∝ (cX, cY, 1 − (1+k)c·s). A ray P + τd meets the quadric where Aτ² + Bτ + C = 0 with (S0 = zv − Pz)
//   A = c(dx² + dy²) + (1+k)c·dz²,  B = 2c(Px·dx + Py·dy) + 2dz − 2(1+k)c·S0·dz,  C = c(Px² + Py²) − 2S0 + (1+k)c·S0²
// and only roots with 0 ≤ s ≤ h belong to the cap (the lower branch; the schema keeps (1+k)h² ≤ a²).
// Roots use the cancellation-free pair q = −(B + sign(B)√Δ)/2, τ1 = q/A, τ2 = C/q (also right when A → 0).

export { HEX_ROW_FACTOR, nearestSite } from './lattice'

/**
 * Smallest τ > 0 where the ray (px, py, pz) + τ(dx, dy, dz) meets the cap surface with vertex (0, 0, zv), or −1.
 * onSurface: the ray starts on this surface (C is taken as exactly 0, so the start root is not found again).
 */
export function capHit(px: number, py: number, pz: number, dx: number, dy: number, dz: number,
  zvUm: number, cPerUm: number, k1: number, sagUm: number, onSurface: boolean): number {
  capHitTo(capScratch, px, py, pz, dx, dy, dz, zvUm, cPerUm, k1, sagUm, onSurface)
  return capScratch[0]!
}

const capScratch = new Float64Array(1)

/**
 * As capHit, writing τ (or −1) into out[0]. The tracer calls this form: a void call costs no boxed double when
 * V8 declines to inline it (the hot loop's inlining budget runs out).
 */
export function capHitTo(out: Float64Array, px: number, py: number, pz: number, dx: number, dy: number, dz: number,
  zvUm: number, cPerUm: number, k1: number, sagUm: number, onSurface: boolean): void {
  out[0] = capHitValue(px, py, pz, dx, dy, dz, zvUm, cPerUm, k1, sagUm, onSurface)
}

function capHitValue(px: number, py: number, pz: number, dx: number, dy: number, dz: number,
  zvUm: number, cPerUm: number, k1: number, sagUm: number, onSurface: boolean): number {
  // s may overshoot [0, h] by rounding at the rim or vertex: 1e-9·h is far above double rounding of s (~1e-16·h)
  // and far below any feature size (a hit 1e-9·h below the rim is on the land to within that).
  const sLo = -1e-9 * sagUm, sHi = sagUm * (1 + 1e-9)
  const s0 = zvUm - pz
  const A = cPerUm * (dx * dx + dy * dy) + k1 * cPerUm * dz * dz
  const B = 2 * cPerUm * (px * dx + py * dy) + 2 * dz - 2 * k1 * cPerUm * s0 * dz
  if (onSurface) {
    if (A === 0) return -1
    const tau = -B / A
    if (!(tau > 0)) return -1
    const s = s0 - tau * dz
    return s >= sLo && s <= sHi ? tau : -1
  }
  const C = cPerUm * (px * px + py * py) - 2 * s0 + k1 * cPerUm * s0 * s0
  const disc = B * B - 4 * A * C
  if (disc < 0) return -1
  const q = B >= 0 ? -0.5 * (B + Math.sqrt(disc)) : -0.5 * (B - Math.sqrt(disc))
  let t1 = q / A, t2 = C / q
  if (t1 > t2) { const tmp = t1; t1 = t2; t2 = tmp }
  if (t1 > 0) {
    const s = s0 - t1 * dz
    if (s >= sLo && s <= sHi) return t1
  }
  if (t2 > 0) {
    const s = s0 - t2 * dz
    if (s >= sLo && s <= sHi) return t2
  }
  return -1
}

/** Outward unit normal of the cap at (x, y, z) (vertex at (0, 0, zv)); writes [nx, ny, nz]. */
export function capNormal(x: number, y: number, z: number, zvUm: number, cPerUm: number, k1: number, out: Float64Array): void {
  const nx = cPerUm * x, ny = cPerUm * y, nz = 1 - k1 * cPerUm * (zvUm - z)
  const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
  out[0] = nx * inv; out[1] = ny * inv; out[2] = nz * inv
}
