// Mergeable tallies of analog Monte Carlo: integer counts only (stored in a Float64Array, exact below 2^53), so
// merging chunks in any order gives bitwise the same totals. Channels: each launched ray ends in exactly one of
// extracted, reflector, substrate, waveguided, trapped, unresolved, stack-absorbed (thin-film source), edge (finite
// panel, panel block). Extracted rays are binned by their direction in
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

/**
 * Colour block (scenarios with `emitter.spectrum` only; a tally made with createTally(true) carries it after the
 * TALLY_LENGTH slots above, and only such a tally is filled). Rows of COLOUR_BINS counts by the ray's wavelength:
 * bin j (0–80) holds 380 + 5j nm ± 2.5 nm (centred on the rows of the CIE 5 nm table, cie1931.ts), bin 81 every
 * wavelength outside 377.5–782.5 nm. Rows 0–44: extracted rays by 2° polar band in air (band b = θ in [2b, 2b + 2)°);
 * row 45: extracted within the on-axis cone θ < PIXEL_AXIS_BINS° (as luminance.onAxisRelative); row 46: every
 * launched ray (the launched spectrum, the photometric reference).
 */
export const COLOUR_BAND_DEG = 2
export const COLOUR_BANDS = THETA_BINS / COLOUR_BAND_DEG
export const COLOUR_BINS = 82
export const COLOUR_IN_RANGE_BINS = 81
export const COLOUR_FIRST_EDGE_NM = 377.5
export const COLOUR_BIN_NM = 5
/** 1/COLOUR_BIN_NM (exact enough: the bin of λ is defined by this product, in the model and the fused loop alike). */
export const COLOUR_BINS_PER_NM = 0.2
export const COLOUR_AXIS_ROW = COLOUR_BANDS
export const COLOUR_LAUNCH_ROW = COLOUR_BANDS + 1
export const COLOUR_ROWS = COLOUR_BANDS + 2
export const T_COLOUR = TALLY_LENGTH
export const COLOUR_TALLY_LENGTH = COLOUR_ROWS * COLOUR_BINS
export const SPECTRAL_TALLY_LENGTH = TALLY_LENGTH + COLOUR_TALLY_LENGTH

/**
 * Panel block (finite panel scenes only, panel.ts; after the base slots and the colour block, if any): rays that
 * ended at a substrate edge (absorbed there, or left through a polished edge: the `edge` channel, so each launched
 * ray of a panel scene ends in exactly one of the channels above or this one), extracted rays leaving inside the
 * detector's spot, those within its acceptance cone, and the spot's rays by 1° polar bin.
 */
export const PT_EDGE = 0
export const PT_SPOT = 1
export const PT_SPOT_ACCEPTED = 2
export const PT_SPOT_THETA = 3
export const PANEL_TALLY_LENGTH = PT_SPOT_THETA + THETA_BINS

export type Tally = Float64Array

/** A zeroed tally; `colour`: with the colour block (for a scene with a spectrum); `panel`: with the panel block. */
export function createTally(colour = false, panel = false): Tally {
  return new Float64Array((colour ? SPECTRAL_TALLY_LENGTH : TALLY_LENGTH) + (panel ? PANEL_TALLY_LENGTH : 0))
}

/** True when the tally carries the colour block. */
export function hasColour(t: Tally): boolean {
  return t.length === SPECTRAL_TALLY_LENGTH || t.length === SPECTRAL_TALLY_LENGTH + PANEL_TALLY_LENGTH
}

/** True when the tally carries the panel block (at t.length − PANEL_TALLY_LENGTH). */
export function hasPanel(t: Tally): boolean {
  return t.length === TALLY_LENGTH + PANEL_TALLY_LENGTH || t.length === SPECTRAL_TALLY_LENGTH + PANEL_TALLY_LENGTH
}

/** The four layouts' lengths (plain, colour, panel, colour + panel): all different, and no one twice another. */
export const TALLY_LENGTHS = [TALLY_LENGTH, SPECTRAL_TALLY_LENGTH, TALLY_LENGTH + PANEL_TALLY_LENGTH, SPECTRAL_TALLY_LENGTH + PANEL_TALLY_LENGTH] as const

/** Colour bin of a wavelength (nm): 0–80 inside 377.5–782.5 nm, 81 outside. */
export function colourBinOf(wavelengthNm: number): number {
  const w = (wavelengthNm - COLOUR_FIRST_EDGE_NM) * COLOUR_BINS_PER_NM
  return w >= 0 && w < COLOUR_IN_RANGE_BINS ? w | 0 : COLOUR_IN_RANGE_BINS
}

/** Adds `src` into `dst` (exact: integer counts). Both must have the same layout (with or without colour). */
export function mergeTally(dst: Tally, src: Tally): Tally {
  if (dst.length !== src.length) throw new Error(`cannot merge a tally of ${src.length} numbers into one of ${dst.length}`)
  for (let i = 0; i < dst.length; i++) dst[i] = dst[i]! + src[i]!
  return dst
}

/**
 * `t` widened to the layout of `like` (a copy with the colour block zeroed) when `like` has colour and `t` does
 * not; else `t` itself. Lets a total made with createTally() take spectral chunks (mergeRunTallies uses it).
 */
export function widenTally(t: Tally, like: Tally): Tally {
  if (t.length >= like.length) return t
  const colour = hasColour(t) || hasColour(like), panel = hasPanel(t) || hasPanel(like)
  const w = createTally(colour, panel)
  // the base slots and the colour block keep their places; a panel block moves to the end
  w.set(hasPanel(t) ? t.subarray(0, t.length - PANEL_TALLY_LENGTH) : t)
  if (hasPanel(t)) w.set(t.subarray(t.length - PANEL_TALLY_LENGTH), w.length - PANEL_TALLY_LENGTH)
  return w
}

export function tallyFromBuffer(buf: ArrayBuffer | ArrayBufferLike): Tally {
  const t = new Float64Array(buf)
  if (!(TALLY_LENGTHS as readonly number[]).includes(t.length)) throw new Error(`tally buffer has ${t.length} numbers, expected one of ${TALLY_LENGTHS.join(', ')}`)
  return t
}
