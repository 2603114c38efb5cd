// Scoring a ray that leaves the film into air (both the fused loop and the readable model call this): its
// direction into the 1° polar bins and the θ–φ map (tally.ts), and, for a finite pixel, whether it leaves inside
// the pixel's footprint and within the on-axis cone. The extracted count itself is the caller's. With a spectrum,
// scoreColour adds every ray's wavelength bin to the launched row and an extracted ray's to its 2° band and the
// on-axis cone (tally.ts, colour block): integer counts from which run.ts derives CIE colour and photometry.
import { SOURCE_DISC, SOURCE_EXTENDED } from './scene'
import {
  COLOUR_AXIS_ROW, COLOUR_BINS, COLOUR_LAUNCH_ROW, PHI_BINS, PIXEL_AXIS_BINS, T_COLOUR, T_MAP, T_PIXEL_AXIS, T_PIXEL_EXTRACTED, T_THETA,
  THETA_BINS, type Tally,
} from './tally'

const RAD_TO_THETA_BIN = 180 / Math.PI // 1° bins
const RAD_TO_PHI_BIN = PHI_BINS / (2 * Math.PI)
const TWO_PI = 2 * Math.PI

/**
 * (dx, dy, dz): direction in air; (ax, ay): absolute lateral exit point, µm; source kind and size as packed.
 * Returns the ray's 1° polar bin.
 */
export function scoreExit(tally: Tally, dx: number, dy: number, dz: number, ax: number, ay: number,
  source: number, srcA: number, srcB: number): number {
  const th = Math.acos(dz > 1 ? 1 : dz) // |d| = 1 up to rounding; acos(1 + 1e-16) would be NaN
  let bt = (th * RAD_TO_THETA_BIN) | 0
  if (bt >= THETA_BINS) bt = THETA_BINS - 1
  let ph = Math.atan2(dy, dx)
  if (ph < 0) ph += TWO_PI
  let bp = (ph * RAD_TO_PHI_BIN) | 0
  if (bp >= PHI_BINS) bp = PHI_BINS - 1
  tally[T_THETA + bt] = tally[T_THETA + bt]! + 1
  if (source !== SOURCE_EXTENDED) {
    // finite pixel: does the ray leave the device within the pixel's footprint?
    const inside = source === SOURCE_DISC ? ax * ax + ay * ay <= srcA * srcA : Math.abs(ax) <= 0.5 * srcA && Math.abs(ay) <= 0.5 * srcB
    if (inside) {
      tally[T_PIXEL_EXTRACTED] = tally[T_PIXEL_EXTRACTED]! + 1
      if (bt < PIXEL_AXIS_BINS) tally[T_PIXEL_AXIS] = tally[T_PIXEL_AXIS]! + 1
    }
  }
  tally[T_MAP + bt * PHI_BINS + bp] = tally[T_MAP + bt * PHI_BINS + bp]! + 1
  return bt
}

/**
 * Colour block: the ray's wavelength bin `wb` (colourBinOf) into the launched row, and, for an extracted ray with
 * 1° polar bin `bt` (−1 when not extracted), into its 2° band row and, within θ < PIXEL_AXIS_BINS°, the on-axis row.
 */
export function scoreColour(tally: Tally, wb: number, bt: number): void {
  const l = T_COLOUR + COLOUR_LAUNCH_ROW * COLOUR_BINS + wb
  tally[l] = tally[l]! + 1
  if (bt < 0) return
  const b = T_COLOUR + (bt >> 1) * COLOUR_BINS + wb
  tally[b] = tally[b]! + 1
  if (bt < PIXEL_AXIS_BINS) {
    const a = T_COLOUR + COLOUR_AXIS_ROW * COLOUR_BINS + wb
    tally[a] = tally[a]! + 1
  }
}
