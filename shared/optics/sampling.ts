// Sampling of launch directions and positions from given uniform numbers in (0, 1) (the caller owns the random
// stream, so these stay pure and testable). Frame: z up, the emitter plane at z = 0. Directions are unit vectors
// written into an output array [dx, dy, dz]; positions in µm into [x, y].
//   isotropic: μ = cosθ = 2u1 − 1 uniform over the full sphere;   lambertian: μ = √u1 over the upper hemisphere
//   (pdf ∝ cosθ); tabulated I(θ): inverse CDF of I(θ)·sinθ on a fine grid (see buildProfileTable).

/** Uniform direction on the sphere. */
export function sampleIsotropic(u1: number, u2: number, out: Float64Array): void {
  const mu = 2 * u1 - 1
  const s = Math.sqrt(Math.max(0, 1 - mu * mu)) // clamp: 1 − μ² may round below 0 at |μ| → 1
  const phi = 2 * Math.PI * u2
  out[0] = s * Math.cos(phi)
  out[1] = s * Math.sin(phi)
  out[2] = mu
}

/** Cosine-weighted direction in the upper hemisphere (dz > 0). */
export function sampleLambertian(u1: number, u2: number, out: Float64Array): void {
  const mu = Math.sqrt(u1)
  const s = Math.sqrt(1 - u1)
  const phi = 2 * Math.PI * u2
  out[0] = s * Math.cos(phi)
  out[1] = s * Math.sin(phi)
  out[2] = mu
}

/** Number of θ intervals of a tabulated profile's inverse-CDF grid. */
export const PROFILE_GRID = 1024

/**
 * Builds the inverse-CDF grid of a tabulated radiant intensity I(θ) (rows [thetaDeg, rel], linear interpolation,
 * zero outside the table). Returns Float64Array [cdf_0..cdf_K, mu_0..mu_K] with K = PROFILE_GRID; within an interval
 * I is taken at its midpoint and μ is uniform between the edges (exact for a constant I; the error of the linear
 * interpolation inside a 1/1024 slice of the table span is below 1e-6 relative).
 */
export function buildProfileTable(rows: ReadonlyArray<readonly [number, number]>): Float64Array {
  const K = PROFILE_GRID
  const out = new Float64Array(2 * (K + 1))
  const t0 = (rows[0]![0] * Math.PI) / 180
  const t1 = (rows[rows.length - 1]![0] * Math.PI) / 180
  let acc = 0
  out[0] = 0
  out[K + 1] = Math.cos(t0)
  let j = 0
  for (let i = 0; i < K; i++) {
    const ta = t0 + ((t1 - t0) * i) / K
    const tb = t0 + ((t1 - t0) * (i + 1)) / K
    const tmDeg = (((ta + tb) / 2) * 180) / Math.PI
    while (j < rows.length - 2 && rows[j + 1]![0] < tmDeg) j++
    const r0 = rows[j]!, r1 = rows[j + 1]!
    // clamp: the interpolation weight stays in [0, 1] (the slice midpoint may sit a rounding error past a row)
    const f = Math.min(1, Math.max(0, (tmDeg - r0[0]) / (r1[0] - r0[0])))
    const intensity = r0[1] + f * (r1[1] - r0[1])
    acc += intensity * (Math.cos(ta) - Math.cos(tb))
    out[i + 1] = acc
    out[K + 2 + i] = Math.cos(tb)
  }
  for (let i = 1; i <= K; i++) out[i] = out[i]! / acc
  out[K] = 1
  return out
}

/** Direction from a profile grid (built by buildProfileTable) stored in `table` at `offset`. */
export function sampleTabulated(table: Float64Array, offset: number, u1: number, u2: number, u3: number, out: Float64Array): void {
  const K = PROFILE_GRID
  let lo = 0, hi = K // find i with cdf[i] ≤ u1 < cdf[i+1]
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1
    if (table[offset + mid]! <= u1) lo = mid
    else hi = mid
  }
  const muA = table[offset + K + 1 + lo]!, muB = table[offset + K + 2 + lo]!
  const mu = muA + (muB - muA) * u3
  const s = Math.sqrt(Math.max(0, 1 - mu * mu)) // clamp: rounding at |μ| → 1
  const phi = 2 * Math.PI * u2
  out[0] = s * Math.cos(phi)
  out[1] = s * Math.sin(phi)
  out[2] = mu
}

/** Uniform point in a disc of radius R centred at the origin. */
export function sampleDisc(radiusUm: number, u1: number, u2: number, out: Float64Array): void {
  const r = radiusUm * Math.sqrt(u1)
  const phi = 2 * Math.PI * u2
  out[0] = r * Math.cos(phi)
  out[1] = r * Math.sin(phi)
}

/** Uniform point in a w × h rectangle centred at the origin. */
export function sampleRectangle(widthUm: number, heightUm: number, u1: number, u2: number, out: Float64Array): void {
  out[0] = (u1 - 0.5) * widthUm
  out[1] = (u2 - 0.5) * heightUm
}

export { sampleCell } from './lattice'
