// Reciprocal (backward) luminance at a viewing direction. Geometric optics with Fresnel is reciprocal: the radiance
// leaving the film towards ω equals what a path launched from air along −ω collects from the emitter when it is
// traced into the device with the same interface rules (steps.ts: the same crossings, reflector, Beer–Lambert and
// event limit). Each time the path crosses the emitting sheet (every emitter step: going down it meets the
// emission going up, going up — after the reflector — the emission going down) it adds the sheet's radiance for the
// forward direction ω_e = −d, L_e = f(μ)/(2π|μ|) per launched unit flux (f: the launch density over μ, azimuth
// uniform), times n_air²/n_e² (L/n² is invariant along a ray: étendue; Born & Wolf §4.8, Yablonovitch, JOSA 72,
// 899 (1982)); it goes on (reflector, substrate, out again) until it leaves or ends. Relative to a Lambertian of the
// launched flux (radiance 1/π): one path scores Σ f(μ)/(2|μ| n_e²). Paths start uniformly over one lattice cell at
// the cap tops (planar: at the top face), so the estimate is the cell-averaged luminance, σ from the spread of the
// path scores. Every path contributes, so the variance is far below counting rays into a small cone.
// Limits: extended sources only (a pixel footprint is a forward notion); grazing crossings weigh 1/|μ| for an
// isotropic or tabulated profile (finite mean; heavy tail only when n_e ≤ n_s, where the emitter sees grazing paths).
import { flatCrossing, CROSS_TRANSMIT, randomPolarization } from './crossings'
import { emissionDensityOf } from './flat-quadrature'
import { sampleCell } from './lattice'
import { createRay, draw, MEDIUM_AIR, MEDIUM_EMITTER, MEDIUM_LENS, MEDIUM_SUBSTRATE, RAY_ENDED, resetRay, type Ray } from './ray'
import type { PackedScene } from './scene'
import { airStep, drawWavelength, emitterStep, lensStep, stackOf, substrateStep, type Stack } from './steps'
import { T_UNRESOLVED } from './tally'

/** Backward paths use streams from here on (0 device, 1 companion, 2 the preview): stream RECIPROCAL_STREAM + k for direction k. */
export const RECIPROCAL_STREAM = 16

/** A viewing direction (deg, φ from +x), or a polar band [loDeg, hiDeg) averaged as a forward bin is (cos-weighted, all φ). */
export type ViewDirection = { thetaDeg: number; phiDeg: number } | { bandLoDeg: number; bandHiDeg: number }

export interface ReciprocalEstimate { relative: number; relativeStdErr: number; paths: number }

const DEG = Math.PI / 180
const cell = new Float64Array(2)
const v2 = new Float64Array(2)

function startPath(ray: Ray, st: Stack, view: ViewDirection): void {
  let th: number, ph: number
  if ('thetaDeg' in view) { th = view.thetaDeg * DEG; ph = view.phiDeg * DEG }
  else {
    // cos-weighted over the band: sin²θ uniform, φ uniform (what a forward 1° bin averages)
    const a = Math.sin(view.bandLoDeg * DEG) ** 2, b = Math.sin(view.bandHiDeg * DEG) ** 2
    th = Math.asin(Math.sqrt(a + (b - a) * draw(ray)))
    ph = 2 * Math.PI * draw(ray)
  }
  sampleCell(st.hexagonal, st.pitchUm, draw(ray), draw(ray), v2)
  ray.x = v2[0]!; ray.y = v2[1]!
  // backward: travelling along −ω
  ray.dx = -Math.sin(th) * Math.cos(ph); ray.dy = -Math.sin(th) * Math.sin(ph); ray.dz = -Math.cos(th)
  if (st.polarized) randomPolarization(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz)
  drawWavelength(ray, st, cell)
}

/**
 * L/L_Lambertian towards `view` from `paths` backward paths (stream RECIPROCAL_STREAM + streamOffset of `seed`) on
 * a packed scene with an extended source.
 */
export function reciprocalLuminance(scene: PackedScene, view: ViewDirection, paths: number, seed: number, streamOffset = 0): ReciprocalEstimate {
  const st = stackOf(scene)
  // backward paths start in one cell and score every emitter crossing: the infinite array's luminance, not a panel's
  if (st.panelAt > 0) throw new Error('reciprocal luminance is for the infinite array: a finite panel is read by its detector (panel.detector)')
  const f = emissionDensityOf(scene)
  const ray = createRay()
  let s1 = 0, s2 = 0
  for (let p = 0; p < paths; p++) {
    resetRay(ray, seed, RECIPROCAL_STREAM + streamOffset, p)
    startPath(ray, st, view)
    let medium: number
    if (st.hasLens) {
      ray.z = st.thicknessUm + st.sagUm; ray.excludeSelf = false
      medium = MEDIUM_AIR
    } else {
      ray.z = st.thicknessUm
      ray.events = 1 // the top face from air is the path's first encounter
      medium = flatCrossing(ray, false, 1, ray.nS, st.fresnel, st.polarized) === CROSS_TRANSMIT ? MEDIUM_SUBSTRATE : RAY_ENDED
    }
    let score = 0
    while (medium !== RAY_ENDED) {
      if (++ray.events > st.maxEvents) { ray.end = T_UNRESOLVED; break }
      ray.medium = medium
      switch (medium) {
        case MEDIUM_EMITTER: {
          // crossing the emitting sheet: the forward emission direction is −d
          const mu = -ray.dz
          const am = mu < 0 ? -mu : mu
          if (am > 0) score += f(mu) / (2 * am * ray.nE * ray.nE)
          medium = emitterStep(ray, st)
          break
        }
        case MEDIUM_SUBSTRATE: medium = substrateStep(ray, st); break
        case MEDIUM_LENS: medium = lensStep(ray, st); break
        default: medium = airStep(ray, st); break
      }
    }
    s1 += score; s2 += score * score
  }
  const mean = s1 / paths
  const variance = paths > 1 ? Math.max(0, (s2 - paths * mean * mean) / (paths - 1)) : 0
  return { relative: mean, relativeStdErr: Math.sqrt(variance / paths), paths }
}

/** luminance.directions of a result: each direction at φ (deg) with its own stream, `paths` backward paths each. */
export function reciprocalDirections(scene: PackedScene, directions: Array<{ thetaDeg: number; phiDeg: number }>, paths: number, seed: number) {
  return directions.map((d, k) => {
    const e = reciprocalLuminance(scene, d, paths, seed, k)
    return { thetaDeg: d.thetaDeg, phiDeg: d.phiDeg, relative: e.relative, relativeStdErr: e.relativeStdErr }
  })
}
