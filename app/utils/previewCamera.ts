// The 3-D preview's camera: an orbit about a target point, z up, lengths in µm, angles in radians. The state is
// (target, distance, azimuth about z from +x, polar angle from +z); every change goes through clampView, which keeps
// the camera above the emitter plane (z = 0) by a clearance, the distance within bounds and the target in the
// substrate's top plane near the patch. Vector maths with gl-matrix (outside any hot loop). Pure: the component
// (DesignPatch3d.client.vue) turns pointer and key input into these calls and copies the position into three.js.
import { vec3 } from 'gl-matrix'

export interface OrbitView {
  /** The point looked at, µm. */
  target: [number, number, number]
  distanceUm: number
  /** About +z, from +x towards +y. */
  azimuthRad: number
  /** From +z: 0 looks straight down, π/2 from the side. */
  polarRad: number
}

export interface OrbitBounds {
  /** Lowest camera height: the emitter plane plus a clearance, µm. */
  minCameraZUm: number
  minDistanceUm: number
  maxDistanceUm: number
  /** The target stays within ±this of the patch centre in x and y, µm. */
  panLimitUm: number
}

/** A double-precision vec3 (gl-matrix's create() and fromValues() make Float32 arrays). */
const f64 = (x = 0, y = 0, z = 0): vec3 => Float64Array.of(x, y, z) as unknown as vec3

/** Polar angles stop this short of straight down, where the azimuth is undefined and the view would spin. */
const MIN_POLAR_RAD = 0.01

/** Bounds for a patch of the given pitch whose substrate's top face is drawn at zTopUm. */
export function orbitBounds(pitchUm: number, patchHalfUm: number): OrbitBounds {
  return { minCameraZUm: 0.05 * pitchUm, minDistanceUm: 1.5 * pitchUm, maxDistanceUm: 60 * pitchUm, panLimitUm: patchHalfUm }
}

/** The view a patch opens with (and Reset view returns to): from the front right, about 40° above the horizon. */
export function homeView(pitchUm: number, zTopUm: number): OrbitView {
  // the same place the preview has always opened at: (6, −7.5, 6.5) pitches from the origin, looking at the top face
  const offset = f64(6 * pitchUm, -7.5 * pitchUm, 6.5 * pitchUm - zTopUm)
  const d = vec3.length(offset)
  return { target: [0, 0, zTopUm], distanceUm: d, azimuthRad: Math.atan2(offset[1], offset[0]), polarRad: Math.acos(offset[2] / d) }
}

/** Camera position of a view, µm. */
export function cameraPosition(v: OrbitView, out: vec3 = f64()): vec3 {
  const s = Math.sin(v.polarRad)
  vec3.set(out, s * Math.cos(v.azimuthRad), s * Math.sin(v.azimuthRad), Math.cos(v.polarRad))
  return vec3.scaleAndAdd(out, f64(...v.target), out, v.distanceUm)
}

/** The view moved inside its bounds: distance clamped, then the polar angle limited so the camera stays above z_min. */
export function clampView(v: OrbitView, b: OrbitBounds): OrbitView {
  const distanceUm = Math.min(b.maxDistanceUm, Math.max(b.minDistanceUm, v.distanceUm))
  const tx = Math.min(b.panLimitUm, Math.max(-b.panLimitUm, v.target[0]))
  const ty = Math.min(b.panLimitUm, Math.max(-b.panLimitUm, v.target[1]))
  const tz = Math.max(b.minCameraZUm, v.target[2])
  // camera z = tz + d·cos φ ≥ z_min  ⇔  φ ≤ acos((z_min − tz)/d)
  const maxPolar = Math.acos(Math.min(1, Math.max(-1, (b.minCameraZUm - tz) / distanceUm)))
  const polarRad = Math.min(maxPolar, Math.max(MIN_POLAR_RAD, v.polarRad))
  const tau = 2 * Math.PI
  const azimuthRad = ((v.azimuthRad % tau) + tau) % tau
  return { target: [tx, ty, tz], distanceUm, azimuthRad, polarRad }
}

/** Turn about the target: dAzimuth about z (positive: the scene turns left), dPolar towards the horizon. */
export function orbitBy(v: OrbitView, dAzimuthRad: number, dPolarRad: number, b: OrbitBounds): OrbitView {
  return clampView({ ...v, azimuthRad: v.azimuthRad + dAzimuthRad, polarRad: v.polarRad + dPolarRad }, b)
}

/** Move closer (factor < 1) or farther (factor > 1). */
export function zoomBy(v: OrbitView, factor: number, b: OrbitBounds): OrbitView {
  return clampView({ ...v, distanceUm: v.distanceUm * factor }, b)
}

/**
 * Slide the target in its horizontal plane: right/forward in µm along the screen's right and the horizontal
 * direction the camera looks in (so the view slides as the drag goes, whatever the azimuth); the height stays.
 */
export function panBy(v: OrbitView, rightUm: number, forwardUm: number, b: OrbitBounds): OrbitView {
  const eye = cameraPosition(v)
  const look = vec3.sub(f64(), f64(...v.target), eye)
  look[2] = 0
  if (vec3.length(look) < 1e-9) vec3.set(look, -Math.cos(v.azimuthRad), -Math.sin(v.azimuthRad), 0) // from straight above
  vec3.normalize(look, look)
  const right = vec3.cross(f64(), look, f64(0, 0, 1))
  const t = f64(...v.target)
  vec3.scaleAndAdd(t, t, right, rightUm)
  vec3.scaleAndAdd(t, t, look, forwardUm)
  return clampView({ ...v, target: [t[0], t[1], v.target[2]] }, b)
}

/** "x,y,z" of the camera, rounded to 0.01 µm: what the page exposes for tests and what Reset view restores. */
export function cameraKey(v: OrbitView): string {
  const p = cameraPosition(v)
  return [p[0], p[1], p[2]].map((c) => (Math.round(c * 100) / 100).toFixed(2)).join(',')
}
