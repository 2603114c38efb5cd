// A finite panel: the glass (substrate) ends at a centred rectangle of half-sizes (hw, hh) µm in edges of one kind,
// light is launched uniformly over a centred emitting rectangle, and a detector decides which exits count. Frame as
// the rest of the core: z up, µm; edges are the vertical faces x = ±hw and y = ±hh of the substrate (0 ≤ z ≤ t).
// Rays carry their absolute lateral position (x + ox, y + oy: the wrapped lattice-cell coordinates plus the site
// offset, ray.ts), so a glass round trip at angle θ moves a ray 2t·tanθ sideways and the edge is met where the
// straight segment meets the rectangle. The lens film and the air below the cap tops are not clipped by the outline:
// a ray's lateral travel there is a few lens pitches (µm) against panel sizes in mm.
// Edge kinds (scene slot P_EDGE_KIND): absorbing → the ray ends in the tally's edge slot; mirrored → specular (ideal
// metal for the field); ground → re-emitted cosine-weighted about the inward normal (Lambert; field depolarised);
// polished → Fresnel / TIR at the glass–air face (crossings.ts curvedCrossing with the outward normal), transmitted
// light ends in the edge slot (it left through the edge).
// Detector (scene slots P_SPOT_*): every extracted ray whose absolute exit point lies in the spot (a disc; the
// sphere's is unbounded) is counted, binned by its 1° polar bin, and counted again when within the acceptance cone
// (dz ≥ cos α). The panel block of the tally (after the base slots and the colour block, if any) holds these.
import type { Panel } from '../types/scenario'
import { PANEL_TALLY_LENGTH, PT_SPOT, PT_SPOT_ACCEPTED, PT_SPOT_THETA, type Tally } from './tally'

export const EDGE_ABSORBING = 0
export const EDGE_MIRRORED = 1
export const EDGE_GROUND = 2
export const EDGE_POLISHED = 3

export const DETECTOR_SPHERE = 0
export const DETECTOR_GONIOMETER = 1
export const DETECTOR_LUMINANCE_METER = 2

/** Scene panel block (offset in S_PANEL_OFFSET): half-sizes and emitting size in µm, kinds, spot in µm, cos α. */
export const P_HALF_WIDTH_UM = 0
export const P_HALF_HEIGHT_UM = 1
export const P_EMIT_WIDTH_UM = 2
export const P_EMIT_HEIGHT_UM = 3
export const P_EDGE_KIND = 4
export const P_DETECTOR = 5
export const P_SPOT_X_UM = 6
export const P_SPOT_Y_UM = 7
/** Spot radius (µm); Infinity for the sphere (every front exit is inside). */
export const P_SPOT_RADIUS_UM = 8
/** cos of the acceptance half-angle (luminance meter; the on-axis cone of 5° otherwise). */
export const P_COS_ACCEPT = 9
export const PANEL_BLOCK_LENGTH = 10

/**
 * ray.end of a ray that ended at an edge: not a slot index itself (the panel block's place depends on whether the
 * tally has the colour block): panelBlockOf(tally) + PT_EDGE. Larger than every real slot.
 */
export const END_EDGE = 1 << 30

/** Acceptance half-angle used for the on-axis figures of the sphere and the goniometer (deg), as the infinite run's. */
export const DEFAULT_ACCEPT_DEG = 5

const DEG = Math.PI / 180

export function edgeKindOf(e: Panel['edges']): number {
  return e === 'mirrored' ? EDGE_MIRRORED : e === 'ground' ? EDGE_GROUND : e === 'polished' ? EDGE_POLISHED : EDGE_ABSORBING
}

/** The scene's panel block for a validated panel. */
export function buildPanelBlock(p: Panel): Float64Array {
  const b = new Float64Array(PANEL_BLOCK_LENGTH)
  b[P_HALF_WIDTH_UM] = p.widthMm * 500
  b[P_HALF_HEIGHT_UM] = p.heightMm * 500
  b[P_EMIT_WIDTH_UM] = (p.emitting?.widthMm ?? p.widthMm) * 1000
  b[P_EMIT_HEIGHT_UM] = (p.emitting?.heightMm ?? p.heightMm) * 1000
  b[P_EDGE_KIND] = edgeKindOf(p.edges)
  const d = p.detector
  b[P_DETECTOR] = d.kind === 'sphere' ? DETECTOR_SPHERE : d.kind === 'goniometer' ? DETECTOR_GONIOMETER : DETECTOR_LUMINANCE_METER
  b[P_SPOT_X_UM] = d.kind === 'sphere' ? 0 : d.spotCentreMm[0] * 1000
  b[P_SPOT_Y_UM] = d.kind === 'sphere' ? 0 : d.spotCentreMm[1] * 1000
  b[P_SPOT_RADIUS_UM] = d.kind === 'sphere' ? Infinity : d.spotDiameterMm * 500
  b[P_COS_ACCEPT] = Math.cos((d.kind === 'luminanceMeter' ? d.acceptanceDeg : DEFAULT_ACCEPT_DEG) * DEG)
  return b
}

/**
 * The first edge a straight lateral move (dx, dy) from the absolute point (ax, ay) meets inside the rectangle
 * |x| ≤ hw, |y| ≤ hh: out[0] = path parameter s ≥ 0 (Infinity when it meets none: dx = dy = 0), out[1] = 1 for an
 * x edge (x = ±hw), 2 for a y edge; ties go to the x edge (the y edge then follows at s = 0, so a corner is two
 * events). A point a rounding error outside (after snapping onto an edge) gives s = 0, never a step back.
 */
export function panelEdgeHit(ax: number, ay: number, dx: number, dy: number, hw: number, hh: number, out: Float64Array): void {
  let sx = Infinity, sy = Infinity
  if (dx > 0) sx = (hw - ax) / dx
  else if (dx < 0) sx = (-hw - ax) / dx
  if (dy > 0) sy = (hh - ay) / dy
  else if (dy < 0) sy = (-hh - ay) / dy
  if (sx < 0) sx = 0
  if (sy < 0) sy = 0
  if (sx <= sy) { out[0] = sx; out[1] = 1 } else { out[0] = sy; out[1] = 2 }
}

/** Offset of the panel block in a tally made for a panel scene (createTally(colour, true)). */
export function panelBlockOf(t: Tally): number {
  return t.length - PANEL_TALLY_LENGTH
}

/**
 * Detector scoring of an extracted ray (film.ts calls it; the fused loop inlines it): absolute exit (ax, ay) µm, dz,
 * its 1° polar bin bt; the panel block at `at` of the tally, the scene's panel block at `pa`.
 */
export function scoreSpot(tally: Tally, at: number, scene: Float64Array, pa: number, ax: number, ay: number, dz: number, bt: number): void {
  const ex = ax - scene[pa + P_SPOT_X_UM]!, ey = ay - scene[pa + P_SPOT_Y_UM]!, r = scene[pa + P_SPOT_RADIUS_UM]!
  if (!(ex * ex + ey * ey <= r * r)) return
  tally[at + PT_SPOT] = tally[at + PT_SPOT]! + 1
  if (dz >= scene[pa + P_COS_ACCEPT]!) tally[at + PT_SPOT_ACCEPTED] = tally[at + PT_SPOT_ACCEPTED]! + 1
  tally[at + PT_SPOT_THETA + bt] = tally[at + PT_SPOT_THETA + bt]! + 1
}
