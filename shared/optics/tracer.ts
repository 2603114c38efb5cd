// A ray's life in the stack, analog Monte Carlo (every decision is a random draw; no weights), frame z up, µm.
//   launch (emitter layer at z = 0; down-going emission meets the reflector first)
//   → emitter/substrate interface (TIR here: lost as waveguided)   → substrate, face to face (Beer–Lambert free
//   path: lost as substrate)   → top face: lens base disc (into the cap) or flat land (into air)
//   → cap surface (Snell / Fresnel / TIR, Hecht ch. 4) → air: neighbour caps and land below the cap tops are
//   searched along the ray's horizontal path (see airSearch) → escape above the cap tops: tallied as extracted.
// Reflector: absorbed with probability 1 − R (lost as reflector), else re-emitted cosine-weighted upward with
// probability diffuseFraction, else mirrored. In the planar device with a specular reflector the lateral invariant
// n·sinθ never changes, so a ray totally reflected at the top face can never escape: it ends at once as trapped.
// More than maxEvents interface/reflector encounters: unresolved. A call may also carry an event budget for all its
// rays (the batch's share): once it is spent, each ray left is cut short and counted unresolved too, so the work of
// one call is bounded whatever the geometry, and decided by the ray stream alone (never by the clock). Positions are wrapped to the nearest lattice site
// whenever the ray reaches the top face (the stack is laterally periodic), so coordinates stay small.
import { createRngState, fillUniforms, seedRay } from './rng'
import { capHit, capHitTo, HEX_ROW_FACTOR } from './geometry'
import { measuredCapHit, measuredCapNormal, setMeasuredCap } from './measured-cap'
import { measuredProfileOf } from './scene'
import { sampleCell, sampleDisc, sampleIsotropic, sampleLambertian, sampleRectangle, sampleTabulated } from './sampling'
import {
  FRESNEL_NONE, LATTICE_SQUARE, PROFILE_ISOTROPIC, PROFILE_LAMBERTIAN, S_ABSORPTION_PER_UM, S_CURVATURE_PER_UM,
  S_DIFFUSE_FRACTION, S_FRESNEL, S_HAS_LENS, S_K1, S_LATTICE, S_LENS_RADIUS_UM, S_MAX_EVENTS, S_N_EMITTER, S_N_LENS,
  S_N_SUBSTRATE, S_PITCH_UM, S_PROFILE, S_REFLECTANCE, S_SAG_UM, S_SOURCE, S_SOURCE_A_UM, S_SOURCE_B_UM, S_TABLE,
  S_THICKNESS_UM, SOURCE_DISC, SOURCE_EXTENDED, type PackedScene,
} from './scene'
import {
  PHI_BINS, PIXEL_AXIS_BINS, T_EVENTS, T_PIXEL_AXIS, T_PIXEL_EXTRACTED, T_PIXEL_RAYS, T_EXTRACTED, T_MAP, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED, T_UNRESOLVED,
  T_WAVEGUIDED, THETA_BINS, type Tally,
} from './tally'

const MED_EMITTER = 0
const MED_SUBSTRATE = 1
const MED_LENS = 2
const MED_AIR = 3

const RAD_TO_THETA_BIN = 180 / Math.PI // 1° bins
const RAD_TO_PHI_BIN = PHI_BINS / (2 * Math.PI)
const TWO_PI = 2 * Math.PI
/** Air search gives up (ray unresolved) after this many half-pitch steps: only grazing rays in sparse arrays. */
const MAX_AIR_STEPS = 1 << 14

const rng = createRngState()
// Uniforms are drawn in blocks of UB into ubuf (a void call, inlined or not) and read inline: the same numbers in
// the same order as nextUniform(rng), without a boxed double per draw from a call V8 declined to inline.
const UB = 8
const ubuf = new Float64Array(UB)
const v3 = new Float64Array(3)
// Air search hit record: [tau, siteX, siteY].
const hit = new Float64Array(3)
const tested = new Int32Array(16)
/** The scene being traced has measured caps (measured-cap.ts); set by traceRange, read by airSearch. */
let measuredScene = false

/** Ends of airSearch. */
export const AIR_ESCAPE = 0
export const AIR_CAP = 1
export const AIR_LAND = 2
export const AIR_LOST = 3

/**
 * Test access to the air search: returns the end kind and writes [τ, siteX, siteY] into `out` (τ for a cap or the
 * land). Geometry arguments as in the packed scene (µm; c in 1/µm; k1 = 1 + conic constant).
 */
export function findAirHit(x: number, y: number, z: number, dx: number, dy: number, dz: number, excludeSelf: boolean,
  hexagonal: boolean, pitchUm: number, lensRadiusUm: number, sagUm: number, thicknessUm: number, cPerUm: number, k1: number,
  out: Float64Array): number {
  const kind = airSearch(x, y, z, dx, dy, dz, excludeSelf, hexagonal, pitchUm, lensRadiusUm, sagUm, thicknessUm, cPerUm, k1)
  out[0] = hit[0]!; out[1] = hit[1]!; out[2] = hit[2]!
  return kind
}

/**
 * Traces rays [firstRay, firstRay + rayCount) of stream `streamId` into `tally` (counts are added). Returns the
 * number of rays traced; `shouldStop` is polled every 4096 rays (an abort leaves a consistent partial tally).
 * `eventBudget` caps the encounters of the whole call: a ray gets at most min(maxEvents, what is left of it).
 */
export function traceRange(
  scene: PackedScene, firstRay: number, rayCount: number, seed: number, tally: Tally,
  shouldStop?: () => boolean, streamId = 0, eventBudget = Infinity,
): number {
  const hasLens = scene[S_HAS_LENS]! !== 0
  const nE = scene[S_N_EMITTER]!, nS = scene[S_N_SUBSTRATE]!, nL = scene[S_N_LENS]!
  const tUm = scene[S_THICKNESS_UM]!, alpha = scene[S_ABSORPTION_PER_UM]!
  const rb = scene[S_REFLECTANCE]!, fd = scene[S_DIFFUSE_FRACTION]!
  const hex = scene[S_LATTICE]! !== LATTICE_SQUARE
  const pitch = scene[S_PITCH_UM]!, aUm = scene[S_LENS_RADIUS_UM]!, hUm = scene[S_SAG_UM]!
  const cv = scene[S_CURVATURE_PER_UM]!, k1 = scene[S_K1]!
  const a2 = aUm * aUm, zv = tUm + hUm
  // Caps of a measured profile: capHit and the normals below follow it (measured-cap.ts).
  const measured = measuredProfileOf(scene)
  setMeasuredCap(measured, aUm, hUm)
  measuredScene = measured !== null
  const profile = scene[S_PROFILE]!, source = scene[S_SOURCE]!
  const srcA = scene[S_SOURCE_A_UM]!, srcB = scene[S_SOURCE_B_UM]!
  const noFresnel = scene[S_FRESNEL]! === FRESNEL_NONE
  const maxEvents = scene[S_MAX_EVENTS]!
  const specular = fd === 0 || rb === 0
  // Lateral positions matter with a lens array (which cap) and for a finite pixel (the footprint tally).
  const trackPos = hasLens || source !== SOURCE_EXTENDED
  const row2Um = 2 * pitch * HEX_ROW_FACTOR // p√3

  let nExt = 0, nRefl = 0, nSub = 0, nWg = 0, nTrap = 0, nUnres = 0, nEvents = 0
  let done = 0
  for (; done < rayCount; done++) {
    if ((done & 4095) === 4095 && shouldStop !== undefined && shouldStop()) break
    seedRay(rng, seed, streamId, firstRay + done)
    let ui = UB // empty block: the first draw refills it

    // launch: position (always drawn, so streams line up between variants), then direction
    const up1 = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), up2 = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))
    if (source === SOURCE_EXTENDED) sampleCell(hex, pitch, up1, up2, v3)
    else if (source === SOURCE_DISC) sampleDisc(srcA, up1, up2, v3)
    else sampleRectangle(srcA, srcB, up1, up2, v3)
    let x = v3[0]!, y = v3[1]!, z = 0
    let ox = 0, oy = 0 // site offset removed by wrapping: the absolute lateral position is (x + ox, y + oy)
    if (profile === PROFILE_ISOTROPIC) sampleIsotropic((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
    else if (profile === PROFILE_LAMBERTIAN) sampleLambertian((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
    else sampleTabulated(scene, S_TABLE, (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
    let dx = v3[0]!, dy = v3[1]!, dz = v3[2]!
    let med = MED_EMITTER
    let onCap = false, excludeSelf = false
    let events = 0
    let end = -1 // tally slot the ray ends in
    const left = eventBudget - nEvents
    const rayMax = left < maxEvents ? left : maxEvents

    while (end < 0) {
      if (++events > rayMax) { end = T_UNRESOLVED; break }
      switch (med) {
        case MED_EMITTER: {
          if (dz < 0) {
            // reflector directly under the emitter
            if ((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)) >= rb) { end = T_REFLECTOR; break }
            if (fd > 0 && (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)) < fd) {
              sampleLambertian((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
              dx = v3[0]!; dy = v3[1]!; dz = v3[2]!
            } else dz = -dz
            break
          }
          // emitter → substrate, normal +z, cosI = dz
          const eta = nE / nS
          const sin2T = eta * eta * (1 - dz * dz)
          if (sin2T >= 1) { end = T_WAVEGUIDED; break }
          const cosT = Math.sqrt(1 - sin2T)
          if (!noFresnel && nE !== nS && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nE, nS)) { dz = -dz; break }
          dx *= eta; dy *= eta; dz = cosT
          med = MED_SUBSTRATE
          break
        }
        case MED_SUBSTRATE: {
          // always face to face: z is 0 or t on entry
          const pathUm = dz > 0 ? tUm / dz : -tUm / dz
          if (alpha > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alpha * pathUm) { end = T_SUBSTRATE; break }
          if (dz < 0) {
            // bottom face: substrate → emitter layer (then the reflector)
            z = 0
            if (trackPos) { x += dx * pathUm; y += dy * pathUm }
            const cosI = -dz
            const eta = nS / nE
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1) { dz = cosI; break }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && nE !== nS && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, nS, nE)) { dz = cosI; break }
            dx *= eta; dy *= eta; dz = -cosT
            med = MED_EMITTER
            break
          }
          z = tUm
          if (trackPos) { x += dx * pathUm; y += dy * pathUm }
          if (hasLens) {
            // wrap to the nearest site (the lens above this point, if any, is that site's)
            wrapToSite(hex, pitch, row2Um, x, y, hit)
            const sx = hit[1]!, sy = hit[2]!
            x -= sx; y -= sy; ox += sx; oy += sy
            if (x * x + y * y < a2) {
              // lens base: substrate → lens material
              if (nL !== nS) {
                const eta = nS / nL
                const sin2T = eta * eta * (1 - dz * dz)
                if (sin2T >= 1) { dz = -dz; break }
                const cosT = Math.sqrt(1 - sin2T)
                if (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nS, nL)) { dz = -dz; break }
                dx *= eta; dy *= eta; dz = cosT
              }
              med = MED_LENS
              onCap = false
              break
            }
          }
          // flat land: substrate → air
          {
            const eta = nS
            const sin2T = eta * eta * (1 - dz * dz)
            if (sin2T >= 1) {
              if (!hasLens && specular) { end = T_TRAPPED; break }
              dz = -dz
              break
            }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nS, 1)) { dz = -dz; break }
            dx *= eta; dy *= eta; dz = cosT
            if (!hasLens) { end = T_EXTRACTED; break }
            med = MED_AIR
            excludeSelf = false
          }
          break
        }
        case MED_LENS: {
          if (measured !== null) hit[0] = measuredCapHit(x, y, z, dx, dy, dz, zv, onCap)
          else capHitTo(hit, x, y, z, dx, dy, dz, zv, cv, k1, hUm, onCap)
          const tS = hit[0]!
          const tB = dz < 0 ? (tUm - z) / dz : Infinity
          if (tS > 0 && tS < tB) {
            if (alpha > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alpha * tS) { end = T_SUBSTRATE; break }
            x += dx * tS; y += dy * tS; z += dz * tS
            // outward normal (see geometry.ts)
            let nx = cv * x, ny = cv * y, nz = 1 - k1 * cv * (zv - z)
            if (measured !== null) { measuredCapNormal(x, y, v3); nx = v3[0]!; ny = v3[1]!; nz = v3[2]! }
            const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
            nx *= inv; ny *= inv; nz *= inv
            const cosI = dx * nx + dy * ny + dz * nz
            const eta = nL
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1 || (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, Math.sqrt(1 - sin2T), nL, 1))) {
              dx -= 2 * cosI * nx; dy -= 2 * cosI * ny; dz -= 2 * cosI * nz
              onCap = true
              break
            }
            const cosT = Math.sqrt(1 - sin2T)
            const g = cosT - eta * cosI
            dx = eta * dx + g * nx; dy = eta * dy + g * ny; dz = eta * dz + g * nz
            med = MED_AIR
            excludeSelf = true
            break
          }
          if (tB === Infinity) { end = T_UNRESOLVED; break } // no exit found (numerically degenerate ray)
          if (alpha > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alpha * tB) { end = T_SUBSTRATE; break }
          x += dx * tB; y += dy * tB; z = tUm
          if (nL !== nS) {
            const cosI = -dz
            const eta = nL / nS
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1) { dz = cosI; onCap = false; break }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, nL, nS)) { dz = cosI; onCap = false; break }
            dx *= eta; dy *= eta; dz = -cosT
          }
          med = MED_SUBSTRATE
          break
        }
        default: {
          // MED_AIR, below the cap tops
          const kind = airSearch(x, y, z, dx, dy, dz, excludeSelf, hex, pitch, aUm, hUm, tUm, cv, k1)
          if (kind === AIR_ESCAPE) { end = T_EXTRACTED; break }
          if (kind === AIR_LOST) { end = T_UNRESOLVED; break }
          const tau = hit[0]!
          x += dx * tau; y += dy * tau; z += dz * tau
          if (kind === AIR_LAND) {
            z = tUm
            const cosI = -dz
            const eta = 1 / nS
            const cosT = Math.sqrt(1 - eta * eta * (1 - cosI * cosI))
            if (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, 1, nS)) { dz = cosI; excludeSelf = false; break }
            dx *= eta; dy *= eta; dz = -cosT
            med = MED_SUBSTRATE
            break
          }
          // a cap: move the origin to its site
          x -= hit[1]!; y -= hit[2]!; ox += hit[1]!; oy += hit[2]!
          let nx = cv * x, ny = cv * y, nz = 1 - k1 * cv * (zv - z)
          if (measured !== null) { measuredCapNormal(x, y, v3); nx = v3[0]!; ny = v3[1]!; nz = v3[2]! }
          const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
          nx *= inv; ny *= inv; nz *= inv
          const cosI = -(dx * nx + dy * ny + dz * nz)
          const eta = 1 / nL
          const cosT = Math.sqrt(1 - eta * eta * (1 - cosI * cosI))
          if (!noFresnel && fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, 1, nL)) {
            dx += 2 * cosI * nx; dy += 2 * cosI * ny; dz += 2 * cosI * nz
            excludeSelf = true // a convex cap cannot be met twice by a straight ray
            break
          }
          const g = eta * cosI - cosT
          dx = eta * dx + g * nx; dy = eta * dy + g * ny; dz = eta * dz + g * nz
          med = MED_LENS
          onCap = true
          break
        }
      }
    }
    nEvents += events
    switch (end) {
      case T_EXTRACTED: {
        nExt++
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
          const ax = x + ox, ay = y + oy
          const inside = source === SOURCE_DISC ? ax * ax + ay * ay <= srcA * srcA : Math.abs(ax) <= 0.5 * srcA && Math.abs(ay) <= 0.5 * srcB
          if (inside) {
            tally[T_PIXEL_EXTRACTED] = tally[T_PIXEL_EXTRACTED]! + 1
            if (bt < PIXEL_AXIS_BINS) tally[T_PIXEL_AXIS] = tally[T_PIXEL_AXIS]! + 1
          }
        }
        tally[T_MAP + bt * PHI_BINS + bp] = tally[T_MAP + bt * PHI_BINS + bp]! + 1
        break
      }
      case T_REFLECTOR: nRefl++; break
      case T_SUBSTRATE: nSub++; break
      case T_WAVEGUIDED: nWg++; break
      case T_TRAPPED: nTrap++; break
      default: nUnres++; break
    }
  }
  tally[T_RAYS] = tally[T_RAYS]! + done
  tally[T_EXTRACTED] = tally[T_EXTRACTED]! + nExt
  tally[T_REFLECTOR] = tally[T_REFLECTOR]! + nRefl
  tally[T_SUBSTRATE] = tally[T_SUBSTRATE]! + nSub
  tally[T_WAVEGUIDED] = tally[T_WAVEGUIDED]! + nWg
  tally[T_TRAPPED] = tally[T_TRAPPED]! + nTrap
  tally[T_UNRESOLVED] = tally[T_UNRESOLVED]! + nUnres
  tally[T_EVENTS] = tally[T_EVENTS]! + nEvents
  if (source !== SOURCE_EXTENDED) tally[T_PIXEL_RAYS] = tally[T_PIXEL_RAYS]! + done
  return done
}

/**
 * Nearest lattice site to (x, y), written to out[1], out[2] (out[0] untouched). The hexagonal lattice is the union
 * of two rectangular lattices p × p√3, the second offset by (p/2, p√3/2): the nearer of their two nearest sites.
 * Exported for tests; void so that a call V8 does not inline costs no boxed double.
 */
export function wrapToSite(hex: boolean, pitch: number, row2Um: number, x: number, y: number, out: Float64Array): void {
  const u = x / pitch
  if (!hex) {
    out[1] = Math.round(u) * pitch; out[2] = Math.round(y / pitch) * pitch
    return
  }
  const v = y / row2Um
  const ax = Math.round(u), ay = Math.round(v)
  const bx = Math.round(u - 0.5) + 0.5, by = Math.round(v - 0.5) + 0.5
  const ex = (u - ax) * pitch, ey = (v - ay) * row2Um, fx = (u - bx) * pitch, fy = (v - by) * row2Um
  if (ex * ex + ey * ey <= fx * fx + fy * fy) { out[1] = ax * pitch; out[2] = ay * row2Um } else { out[1] = bx * pitch; out[2] = by * row2Um }
}

/**
 * Fresnel decision: reflect when u < (Rs + Rp)/2 (interfaces.ts). Returns a boolean, not R: V8 boxes a double
 * returned from a call it did not inline, and the tracer's inlining budget is spent long before its last call site.
 */
function fresnelReflects(u: number, cosI: number, cosT: number, n1: number, n2: number): boolean {
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const rs = (a - b) / (a + b)
  const rp = (c - d) / (c + d)
  return u < 0.5 * (rs * rs + rp * rp)
}

/**
 * Follows a ray in air below the cap tops (t ≤ z ≤ t + h) and finds what it meets first: a cap (hit = [τ, sx, sy]),
 * the flat land (hit[0] = τ) or nothing (escape). Coordinates are relative to the current site (the origin), whose
 * cap is skipped when `excludeSelf` (the ray has just left or bounced off it).
 * Search: sample the horizontal path every δ = p/2; at each sample test the sites of the containing lattice
 * triangle (hexagonal) or square that lie within R = √(a² + δ²/4): any cap the path crosses has its site within a
 * of the path, hence within R of the nearest sample, and every site within R < p/√3 of a point is a vertex of the
 * point's triangle/square (a ≤ p/2). A hit at horizontal distance s* is final once the samples pass s* + a + δ/2
 * (no untested cap can be met before that).
 */
function airSearch(x: number, y: number, z: number, dx: number, dy: number, dz: number, excludeSelf: boolean,
  hex: boolean, pitch: number, aUm: number, hUm: number, tUm: number, cv: number, k1: number): number {
  const zTop = tUm + hUm
  if (dz >= 0 && z >= zTop) return AIR_ESCAPE
  const tz = dz > 0 ? (zTop - z) / dz : dz < 0 ? (tUm - z) / dz : Infinity
  const hs = Math.sqrt(dx * dx + dy * dy)
  const step = 0.5 * pitch
  let lh = hs * tz
  if (!(hs > 0)) lh = 0
  let truncated = false
  if (!(lh <= MAX_AIR_STEPS * step)) { lh = MAX_AIR_STEPS * step; truncated = true }
  const r2 = aUm * aUm + 0.25 * step * step
  // (a·|d_xy|)², with a 1e-9 relative allowance so rays grazing a rim are still handed to the exact test
  const a2h2 = aUm * aUm * (dx * dx + dy * dy) * (1 + 1e-9)
  const margin = aUm + 0.5 * step
  const rowUm = pitch * HEX_ROW_FACTOR
  const invHs = hs > 0 ? 1 / hs : 0
  let best = Infinity, bsx = 0, bsy = 0
  let nTested = 0
  for (let k = 0; ; k++) {
    let s = k * step
    if (s > lh) s = lh
    const tk = s * invHs
    const px = x + dx * tk, py = y + dy * tk
    let i0: number, j0: number, upper = false
    if (hex) {
      const v = py / rowUm, u = px / pitch - 0.5 * v
      i0 = Math.floor(u); j0 = Math.floor(v)
      upper = u - i0 + (v - j0) >= 1
    } else {
      i0 = Math.floor(px / pitch); j0 = Math.floor(py / pitch)
    }
    const nv = hex ? 3 : 4
    for (let m = 0; m < nv; m++) {
      let i: number, j: number
      if (hex) {
        if (upper) { i = m === 1 ? i0 : i0 + 1; j = m === 2 ? j0 : j0 + 1 } // (1,1) (0,1) (1,0)
        else { i = m === 1 ? i0 + 1 : i0; j = m === 2 ? j0 + 1 : j0 } // (0,0) (1,0) (0,1)
      } else { i = i0 + (m & 1); j = j0 + (m >> 1) }
      if (excludeSelf && i === 0 && j === 0) continue
      const sx = hex ? (i + 0.5 * j) * pitch : i * pitch
      const sy = hex ? j * rowUm : j * pitch
      const ex = px - sx, ey = py - sy
      if (ex * ex + ey * ey > r2) continue
      // cheap rejections before the quadric: the site's disc must reach the ray's horizontal line, ahead of the start
      const wx = sx - x, wy = sy - y
      const cross = wx * dy - wy * dx, along = wx * dx + wy * dy
      if (cross * cross > a2h2 || along < -aUm * hs) continue
      // each site once per search (a ring of the last 8 tested is enough: a site stays within R for ≤ 4 samples)
      let seen = false
      const lim = nTested < 8 ? nTested : 8
      for (let q = 0; q < lim; q++) if (tested[2 * q] === i && tested[2 * q + 1] === j) { seen = true; break }
      if (seen) continue
      const slot = nTested & 7
      tested[2 * slot] = i; tested[2 * slot + 1] = j
      nTested++
      const tau = measuredScene ? measuredCapHit(x - sx, y - sy, z, dx, dy, dz, zTop, false) : capHit(x - sx, y - sy, z, dx, dy, dz, zTop, cv, k1, hUm, false)
      if (tau > 0 && tau < best) { best = tau; bsx = sx; bsy = sy }
    }
    if (best < Infinity && s > best * hs + margin) break
    if (s >= lh) break
  }
  if (best < Infinity) { hit[0] = best; hit[1] = bsx; hit[2] = bsy; return AIR_CAP }
  if (truncated) return AIR_LOST
  if (dz > 0) return AIR_ESCAPE
  hit[0] = tz
  return AIR_LAND
}
