// The state of one ray in the readable model (steps.ts): where it is, where it goes, which medium it is in, and
// its own slice of the random stream. Frame z up, µm. Positions are kept relative to the current lattice site
// (x, y) with the site offset (ox, oy) removed by wrapping: the absolute lateral position is (x + ox, y + oy).
// With Fresnel mode "polarized" the ray's field (a complex unit vector perpendicular to d, crossings.ts) is in pol.
import { createRngState, nextUniform, seedRay, type RngState } from './rng'

export const MEDIUM_EMITTER = 0
export const MEDIUM_SUBSTRATE = 1
export const MEDIUM_LENS = 2
export const MEDIUM_AIR = 3
/** Returned by a step when the ray's life is over (its tally slot is in `end`). */
export const RAY_ENDED = -1

export interface Ray {
  x: number; y: number; z: number
  ox: number; oy: number
  dx: number; dy: number; dz: number
  medium: number
  /** In the lens: the ray starts on the cap surface (after a reflection there or entry through it). */
  onCap: boolean
  /** In air: the current site's cap is skipped (the ray has just left or bounced off it). */
  excludeSelf: boolean
  /** Interface and reflector encounters so far (steps taken). */
  events: number
  /** Tally slot the ray ended in (tally.ts), −1 while alive. */
  end: number
  /** Reflections so far (reflector, Fresnel, TIR): a diagnostic for the preview, not tallied. */
  bounces: number
  /** Field [xRe, xIm, yRe, yIm, zRe, zIm] (Fresnel mode "polarized" only; else unused). */
  pol: Float64Array
  /** Wavelength (nm) and the ray's indices and absorption (1/µm) at it: the scene's unless it has a spectrum. */
  wavelengthNm: number
  nE: number; nS: number; nL: number; alphaS: number; alphaL: number
  /** Thin-film source: the wavelength node of the stack's tables the ray uses (thinfilm/source.ts). */
  tfNode: number
  rng: RngState
}

export function createRay(): Ray {
  return {
    x: 0, y: 0, z: 0, ox: 0, oy: 0, dx: 0, dy: 0, dz: 1, medium: MEDIUM_EMITTER, onCap: false, excludeSelf: false, events: 0, end: -1, bounces: 0,
    pol: new Float64Array(6), wavelengthNm: 550, nE: 1, nS: 1, nL: 1, alphaS: 0, alphaL: 0, tfNode: 0, rng: createRngState(),
  }
}

/** Puts the ray at the start of its life: ray `rayIndex` of stream `streamId` of `seed`, nowhere yet. */
export function resetRay(ray: Ray, seed: number, streamId: number, rayIndex: number): void {
  seedRay(ray.rng, seed, streamId, rayIndex)
  ray.x = 0; ray.y = 0; ray.z = 0; ray.ox = 0; ray.oy = 0
  ray.dx = 0; ray.dy = 0; ray.dz = 1
  ray.medium = MEDIUM_EMITTER; ray.onCap = false; ray.excludeSelf = false
  ray.events = 0; ray.end = -1; ray.bounces = 0
}

/** The ray's next uniform number in (0, 1) (every random decision draws one, in the order the steps make them). */
export function draw(ray: Ray): number {
  return nextUniform(ray.rng)
}
