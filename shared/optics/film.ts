// Scoring a ray that leaves the film into air (both the fused loop and the readable model call this): its
// direction into the 1° polar bins and the θ–φ map (tally.ts), and, for a finite pixel, whether it leaves inside
// the pixel's footprint and within the on-axis cone. The extracted count itself is the caller's.
import { SOURCE_DISC, SOURCE_EXTENDED } from './scene'
import { PHI_BINS, PIXEL_AXIS_BINS, T_MAP, T_PIXEL_AXIS, T_PIXEL_EXTRACTED, T_THETA, THETA_BINS, type Tally } from './tally'

const RAD_TO_THETA_BIN = 180 / Math.PI // 1° bins
const RAD_TO_PHI_BIN = PHI_BINS / (2 * Math.PI)
const TWO_PI = 2 * Math.PI

/** (dx, dy, dz): direction in air; (ax, ay): absolute lateral exit point, µm; source kind and size as packed. */
export function scoreExit(tally: Tally, dx: number, dy: number, dz: number, ax: number, ay: number,
  source: number, srcA: number, srcB: number): void {
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
}
