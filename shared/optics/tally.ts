// Mergeable tallies of analog Monte Carlo: integer counts only (stored in a Float64Array, exact below 2^53), so
// merging chunks in any order gives bitwise the same totals. Channels: each launched ray ends in exactly one of
// extracted, reflector, substrate, waveguided, trapped, unresolved, stack-absorbed (thin-film source). Extracted rays are binned by their direction in
// air: 90 polar bins of 1° (θ from +z) and a θ–φ map of 90 × 72 bins (φ from +x, 5° bins: 12 per 60°, 18 per 90°,
// so 6-fold and 4-fold symmetry can be checked bin for bin).

export const THETA_BINS = 90
export const PHI_BINS = 72
export const T_RAYS = 0
export const T_EXTRACTED = 1
export const T_REFLECTOR = 2
export const T_SUBSTRATE = 3
export const T_WAVEGUIDED = 4
export const T_TRAPPED = 5
export const T_UNRESOLVED = 6
export const T_EVENTS = 7 // interface and reflector encounters, all rays (diagnostic)
export const T_THETA = 8
export const T_MAP = T_THETA + THETA_BINS
/**
 * Finite pixel (disc or rectangle source): extracted rays that leave the device inside the pixel's footprint
 * (lateral exit position within the source shape), all angles and within the on-axis cone θ < PIXEL_AXIS_BINS°.
 * This is what a luminance meter focused on the pixel sees; lenses spread light sideways out of it.
 */
export const T_PIXEL_EXTRACTED = T_MAP + THETA_BINS * PHI_BINS
export const T_PIXEL_AXIS = T_PIXEL_EXTRACTED + 1
/** Rays launched from a finite pixel (equals T_RAYS for disc/rectangle sources, 0 for an extended one). */
export const T_PIXEL_RAYS = T_PIXEL_AXIS + 1
export const PIXEL_AXIS_BINS = 5
/** Thin-film source: rays that came back down to the layer stack and were absorbed there (1 − R of the stack). */
export const T_STACK_ABSORBED = T_PIXEL_RAYS + 1
export const TALLY_LENGTH = T_STACK_ABSORBED + 1

export type Tally = Float64Array

export function createTally(): Tally {
  return new Float64Array(TALLY_LENGTH)
}

/** Adds `src` into `dst` (exact: integer counts). */
export function mergeTally(dst: Tally, src: Tally): Tally {
  for (let i = 0; i < TALLY_LENGTH; i++) dst[i] = dst[i]! + src[i]!
  return dst
}

export function tallyFromBuffer(buf: ArrayBuffer | ArrayBufferLike): Tally {
  const t = new Float64Array(buf)
  if (t.length !== TALLY_LENGTH) throw new Error(`tally buffer has ${t.length} numbers, expected ${TALLY_LENGTH}`)
  return t
}
