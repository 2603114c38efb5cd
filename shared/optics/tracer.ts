// A ray's life in the stack, analog Monte Carlo (every decision is a random draw; no weights), frame z up, µm.
//   launch (emitter layer at z = 0; down-going emission meets the reflector first)
//   → emitter/substrate interface (TIR here: lost as waveguided)   → substrate, face to face (Beer–Lambert free
//   path: lost as substrate)   → top face: lens base disc (into the cap) or flat land (into air)
//   → cap surface (Snell / Fresnel / TIR, Hecht ch. 4) → air: neighbour caps and land below the cap tops are
//   searched along the ray's horizontal path (air-search.ts) → escape above the cap tops: tallied as extracted.
// Reflector: absorbed with probability 1 − R (lost as reflector), else re-emitted cosine-weighted upward with
// probability diffuseFraction, else mirrored. In the planar device with a specular reflector the lateral invariant
// n·sinθ never changes, so a ray totally reflected at the top face can never escape: it ends at once as trapped.
// More than maxEvents interface/reflector encounters: unresolved. A call may also carry an event budget for all its
// rays (the batch's share): once it is spent, each ray left is cut short and counted unresolved too, so the work of
// one call is bounded whatever the geometry, and decided by the ray stream alone (never by the clock). Positions are wrapped to the nearest lattice site
// whenever the ray reaches the top face (the stack is laterally periodic), so coordinates stay small; the site offset
// (ox, oy) keeps the absolute position. A finite panel (panel.ts) cuts substrate segments at its edges, where the ray
// is absorbed, mirrored, re-emitted (ground) or meets a polished glass–air face (steps.ts edgeStep).
// Thin-film source (scene[S_THINFILM_OFFSET] > 0): the launch draws the wavelength first, then polarisation, μ and φ
// from the stack's emission into the glass, and the ray starts in the substrate going up; at the bottom face the
// stack reflects with its own r_s, r_p or absorbs (stackAbsorbed), as steps.ts stackStep.
// This is the fused loop, kept for speed: the readable model of the same life is steps.ts (one function per medium,
// run by model.ts), and tests/unit/optics/model-equality.test.ts proves the two give bit-identical tallies. Physics
// lands in the readable model first, then here (shared/optics/README.md).
import { createRngState, fillUniforms, seedRay } from './rng'
import { capHitTo, HEX_ROW_FACTOR } from './geometry'
import { measuredCapHit, measuredCapNormal, setMeasuredCap } from './measured-cap'
import { AIR_ESCAPE, AIR_LAND, AIR_LOST, airHit, airSearch, setAirSearchMeasured } from './air-search'
import {
  fresnelReflects, linearPolarizationIn, metalReflectIn, metalReflectNormalIn, pin, polarizedReflectsIn, polarizedTirIn, randomPolarizationIn, stackReflectsIn,
} from './crossings'
import {
  EDGE_ABSORBING, EDGE_GROUND, EDGE_MIRRORED, END_EDGE, P_EDGE_KIND, P_EMIT_HEIGHT_UM, P_EMIT_WIDTH_UM, P_HALF_HEIGHT_UM, P_HALF_WIDTH_UM, panelBlockOf,
  panelEdgeHit, scoreSpot,
} from './panel'
import { TF_GUIDE, TF_HEADER, thinFilmNode, thinFilmNodeLength } from './thinfilm/source'
import { wrapToSite } from './lattice'
import { SP_AL, SP_AS, SP_CDF, SP_GUIDE, SP_NE, SP_NL, SP_NODES, SP_NS, SP_STRIDE, SPECTRAL_GRID } from './spectral'
import { measuredProfileOf } from './scene'
import { sampleCell, sampleDisc, sampleIsotropic, sampleLambertian, sampleRectangle, sampleTabulated } from './sampling'
import {
  FRESNEL_NONE, FRESNEL_POLARIZED, LATTICE_SQUARE, PROFILE_ISOTROPIC, PROFILE_LAMBERTIAN, S_ABSORPTION_PER_UM, S_CURVATURE_PER_UM,
  S_DIFFUSE_FRACTION, S_FRESNEL, S_HAS_LENS, S_K1, S_LATTICE, S_LENS_RADIUS_UM, S_MAX_EVENTS, S_N_EMITTER, S_N_LENS,
  S_N_SUBSTRATE, S_LENS_ABSORPTION_PER_UM, S_SPECTRAL_OFFSET, S_PITCH_UM, S_PROFILE, S_REFLECTANCE, S_SAG_UM, S_SOURCE, S_SOURCE_A_UM, S_SOURCE_B_UM, S_TABLE,
  S_PANEL_OFFSET, S_THICKNESS_UM, S_THINFILM_OFFSET, SOURCE_DISC, SOURCE_EXTENDED, type PackedScene,
} from './scene'
import {
  COLOUR_AXIS_ROW, COLOUR_BINS, COLOUR_BINS_PER_NM, COLOUR_FIRST_EDGE_NM, COLOUR_IN_RANGE_BINS, COLOUR_LAUNCH_ROW, hasColour, hasPanel, PT_EDGE, T_COLOUR,
  PHI_BINS, PIXEL_AXIS_BINS, T_EVENTS, T_STACK_ABSORBED, T_PIXEL_AXIS, T_PIXEL_EXTRACTED, T_PIXEL_RAYS, T_EXTRACTED, T_MAP, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED, T_UNRESOLVED,
  T_WAVEGUIDED, THETA_BINS, type Tally,
} from './tally'

const MED_EMITTER = 0
const MED_SUBSTRATE = 1
const MED_LENS = 2
const MED_AIR = 3

const RAD_TO_THETA_BIN = 180 / Math.PI // 1° bins
const RAD_TO_PHI_BIN = PHI_BINS / (2 * Math.PI)
const TWO_PI = 2 * Math.PI

export { AIR_CAP, AIR_ESCAPE, AIR_LAND, AIR_LOST, findAirHit } from './air-search'
export { wrapToSite } from './lattice'

const rng = createRngState()
// Uniforms are drawn in blocks of UB into ubuf (a void call, inlined or not) and read inline: the same numbers in
// the same order as nextUniform(rng), without a boxed double per draw from a call V8 declined to inline.
const UB = 8
const ubuf = new Float64Array(UB)
const v3 = new Float64Array(3)
// Scratch: capHitTo writes τ into hit[0], wrapToSite the site into hit[1], hit[2].
const hit = new Float64Array(3)
// The ray's field in Fresnel mode "polarized" (crossings.ts: [xRe, xIm, yRe, yIm, zRe, zIm]).
const pol = new Float64Array(6)
// A finite panel's edge hit (panel.ts panelEdgeHit: path parameter, which edge).
const eh = new Float64Array(2)

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
  const nE0 = scene[S_N_EMITTER]!, nS0 = scene[S_N_SUBSTRATE]!, nL0 = scene[S_N_LENS]!
  const tUm = scene[S_THICKNESS_UM]!, alpha0 = scene[S_ABSORPTION_PER_UM]!, alphaL0 = scene[S_LENS_ABSORPTION_PER_UM]!
  const spAt = scene[S_SPECTRAL_OFFSET]! // spectral block (spectral.ts), 0 without a spectrum
  const spNodes = spAt + SP_NODES, spGuide = spAt + SP_GUIDE // node 0 and the guide table
  // node fields relative to a node, and the next node's (locals: imported bindings are not constant-folded)
  const stride = SP_STRIDE, fCdf = SP_CDF, fNE = SP_NE, fNS = SP_NS, fNL = SP_NL, fAS = SP_AS, fAL = SP_AL, grid = SPECTRAL_GRID
  // colour counts (film.ts scoreColour) only with a spectrum and a tally that has the block
  const colour = spAt > 0 && hasColour(tally)
  const launchRow = T_COLOUR + COLOUR_LAUNCH_ROW * COLOUR_BINS, axisRow = T_COLOUR + COLOUR_AXIS_ROW * COLOUR_BINS
  const colourBins = COLOUR_BINS, firstEdgeNm = COLOUR_FIRST_EDGE_NM, binsPerNm = COLOUR_BINS_PER_NM, inRange = COLOUR_IN_RANGE_BINS
  const axisBins = PIXEL_AXIS_BINS, colourAt = T_COLOUR
  const tfAt = scene[S_THINFILM_OFFSET]! // thin-film block (thinfilm/source.ts), 0 for the sheet emitter
  // its layout (thinfilm/source.ts header): node 0, values per node, the μ grid, cells; a node's guide and r tables
  const tfA = tfAt > 0 ? scene[tfAt + 3]! : 0, tfRA = tfAt > 0 ? scene[tfAt + 4]! : 0
  const tfMu = tfAt + TF_HEADER, tfNodes = tfMu + tfA + 1, tfNL = thinFilmNodeLength(tfA, tfRA)
  const tfR = 1 + 2 * (tfA + 1), tfRn = tfRA + 1, tfGuide = tfR + 4 * tfRn, tfG = TF_GUIDE
  const rb = scene[S_REFLECTANCE]!, fd = scene[S_DIFFUSE_FRACTION]!
  const hex = scene[S_LATTICE]! !== LATTICE_SQUARE
  const pitch = scene[S_PITCH_UM]!, aUm = scene[S_LENS_RADIUS_UM]!, hUm = scene[S_SAG_UM]!
  const cv = scene[S_CURVATURE_PER_UM]!, k1 = scene[S_K1]!
  const a2 = aUm * aUm, zv = tUm + hUm
  // Caps of a measured profile: capHit and the normals below follow it (measured-cap.ts).
  const measured = measuredProfileOf(scene)
  setMeasuredCap(measured, aUm, hUm)
  setAirSearchMeasured(measured !== null)
  const profile = scene[S_PROFILE]!, source = scene[S_SOURCE]!
  const srcA = scene[S_SOURCE_A_UM]!, srcB = scene[S_SOURCE_B_UM]!
  const noFresnel = scene[S_FRESNEL]! === FRESNEL_NONE
  const polar = scene[S_FRESNEL]! === FRESNEL_POLARIZED
  const maxEvents = scene[S_MAX_EVENTS]!
  // A finite panel (panel.ts): its half-sizes and emitting size (µm), edge kind; 0 offset for the infinite array.
  const pa = scene[S_PANEL_OFFSET]!
  if (pa > 0 && !hasPanel(tally)) throw new Error('a finite panel scene needs a tally with the panel block: createTally(colour, true)')
  const hw = pa > 0 ? scene[pa + P_HALF_WIDTH_UM]! : Infinity, hh = pa > 0 ? scene[pa + P_HALF_HEIGHT_UM]! : Infinity
  const emW = pa > 0 ? scene[pa + P_EMIT_WIDTH_UM]! : 0, emH = pa > 0 ? scene[pa + P_EMIT_HEIGHT_UM]! : 0
  const edgeKind = pa > 0 ? scene[pa + P_EDGE_KIND]! : EDGE_ABSORBING
  const pb = pa > 0 ? panelBlockOf(tally) : 0
  // a totally reflected planar ray can never escape: the infinite array, or a panel whose mirrored edges keep n·sinθ
  const specular = (fd === 0 || rb === 0) && (pa === 0 || edgeKind === EDGE_MIRRORED)
  // Lateral positions matter with a lens array (which cap), for a finite pixel (the footprint tally) and a panel (edges, spot).
  const trackPos = hasLens || source !== SOURCE_EXTENDED || pa > 0
  const row2Um = 2 * pitch * HEX_ROW_FACTOR // p√3

  let nExt = 0, nRefl = 0, nSub = 0, nWg = 0, nTrap = 0, nUnres = 0, nStack = 0, nEdge = 0, nEvents = 0
  let done = 0
  for (; done < rayCount; done++) {
    if ((done & 4095) === 4095 && shouldStop !== undefined && shouldStop()) break
    seedRay(rng, seed, streamId, firstRay + done)
    let ui = UB // empty block: the first draw refills it

    // launch: position (always drawn, so streams line up between variants), then direction
    const up1 = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), up2 = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))
    if (pa > 0) sampleRectangle(emW, emH, up1, up2, v3) // a panel: uniform over its emitting area
    else if (source === SOURCE_EXTENDED) sampleCell(hex, pitch, up1, up2, v3)
    else if (source === SOURCE_DISC) sampleDisc(srcA, up1, up2, v3)
    else sampleRectangle(srcA, srcB, up1, up2, v3)
    let x = v3[0]!, y = v3[1]!, z = 0
    let ox = 0, oy = 0 // site offset removed by wrapping: the absolute lateral position is (x + ox, y + oy)
    let dx = 0, dy = 0, dz = 1
    let tfNode = 0
    if (tfAt === 0) {
      if (profile === PROFILE_ISOTROPIC) sampleIsotropic((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
      else if (profile === PROFILE_LAMBERTIAN) sampleLambertian((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
      else sampleTabulated(scene, S_TABLE, (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
      dx = v3[0]!; dy = v3[1]!; dz = v3[2]!
      if (polar) { pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)); pin[0] = dx; pin[1] = dy; pin[2] = dz; randomPolarizationIn(pol) }
    }
    let nE = nE0, nS = nS0, nL = nL0, alpha = alpha0, alphaL = alphaL0
    let wb = 0 // the ray's colour bin (tally.ts colourBinOf; read only for the colour counts)
    if (spAt > 0) {
      // the ray's wavelength, and its indices and absorption there
      // spectral.ts sampleWavelength and spectralValue, inlined by hand (same operations in the same order)
      const uw = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))
      let lo = scene[spGuide + ((uw * grid) | 0)]! | 0
      while (scene[spNodes + (lo + 1) * stride + fCdf]! <= uw) lo++
      const q = spNodes + lo * stride, r = q + stride // nodes lo and lo + 1
      const ca = scene[q + fCdf]!, cb = scene[r + fCdf]!
      const f = cb > ca ? (uw - ca) / (cb - ca) : 0
      const wf = (scene[spAt]! + (lo + f) * scene[spAt + 1]! - firstEdgeNm) * binsPerNm // colourBinOf(λ), inlined
      wb = wf >= 0 && wf < inRange ? wf | 0 : inRange
      let va = scene[q + fNE]!
      nE = va + f * (scene[r + fNE]! - va)
      va = scene[q + fNS]!
      nS = va + f * (scene[r + fNS]! - va)
      va = scene[q + fNL]!
      nL = va + f * (scene[r + fNL]! - va)
      va = scene[q + fAS]!
      alpha = va + f * (scene[r + fAS]! - va)
      va = scene[q + fAL]!
      alphaL = va + f * (scene[r + fAL]! - va)
      if (tfAt > 0) tfNode = thinFilmNode(scene, tfAt, scene[spAt]! + (lo + 0.5) * scene[spAt + 1]!)
    }
    let med = MED_EMITTER
    if (tfAt > 0) {
      // thin-film source: polarisation, μ and φ of the stack's emission into the glass; the ray starts there going up
      const uPol = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), uTheta = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), uPhi = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))
      // thinfilm/source.ts sampleThinFilmLaunch, inlined by hand (same operations in the same order)
      const tb = tfNodes + tfNode * tfNL
      const isP = uPol < scene[tb]! ? 0 : 1
      const c = tb + 1 + isP * (tfA + 1)
      let lo = scene[tb + tfGuide + isP * tfG + ((uTheta * tfG) | 0)]! | 0
      while (scene[c + lo + 1]! <= uTheta) lo++
      const ca = scene[c + lo]!, cb = scene[c + lo + 1]!
      const f = cb > ca ? (uTheta - ca) / (cb - ca) : 0
      const muA = scene[tfMu + lo]!, muB = scene[tfMu + lo + 1]!
      const mu = muA + (muB - muA) * f
      const m2 = 1 - mu * mu
      const st = m2 > 0 ? Math.sqrt(m2) : 0
      const phi = TWO_PI * uPhi
      dx = st * Math.cos(phi); dy = st * Math.sin(phi); dz = mu
      if (polar) { pin[0] = dx; pin[1] = dy; pin[2] = dz; pin[10] = isP; linearPolarizationIn(pol) }
      med = MED_SUBSTRATE
    }
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
              if (polar) { pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)); pin[0] = dx; pin[1] = dy; pin[2] = dz; randomPolarizationIn(pol) }
            } else {
              if (polar) { pin[0] = dx; pin[1] = dy; pin[2] = dz; metalReflectIn(pol) }
              dz = -dz
            }
            break
          }
          // emitter → substrate, normal +z, cosI = dz
          const eta = nE / nS
          const sin2T = eta * eta * (1 - dz * dz)
          if (sin2T >= 1) { end = T_WAVEGUIDED; break }
          const cosT = Math.sqrt(1 - sin2T)
          if (!noFresnel && nE !== nS && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = 1, pin[6] = dz, pin[7] = cosT, pin[8] = nE, pin[9] = nS, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nE, nS))) { dz = -dz; break }
          dx *= eta; dy *= eta; dz = cosT
          med = MED_SUBSTRATE
          break
        }
        case MED_SUBSTRATE: {
          // face to face (z is 0 or t on entry), except on a finite panel after an edge event (steps.ts panelSubstrateStep)
          let pathUm
          if (pa > 0) {
            pathUm = dz > 0 ? (tUm - z) / dz : dz < 0 ? -z / dz : Infinity
            panelEdgeHit(x + ox, y + oy, dx, dy, hw, hh, eh)
            const sE = eh[0]!
            if (sE < pathUm) {
              if (alpha > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alpha * sE) { end = T_SUBSTRATE; break }
              x += dx * sE; y += dy * sE; z += dz * sE
              const xEdge = eh[1] === 1
              if (xEdge) x = (dx > 0 ? hw : -hw) - ox
              else y = (dy > 0 ? hh : -hh) - oy
              // the edge (steps.ts edgeStep)
              if (edgeKind === EDGE_ABSORBING) { end = END_EDGE; break }
              const nx = xEdge ? (dx > 0 ? 1 : -1) : 0, ny = xEdge ? 0 : (dy > 0 ? 1 : -1)
              if (edgeKind === EDGE_MIRRORED) {
                const cosI = xEdge ? dx * nx : dy * ny
                if (polar) { pin[0] = dx; pin[1] = dy; pin[2] = dz; pin[3] = nx; pin[4] = ny; pin[5] = 0; pin[6] = cosI; metalReflectNormalIn(pol) }
                if (xEdge) dx -= 2 * cosI * nx
                else dy -= 2 * cosI * ny
                break
              }
              if (edgeKind === EDGE_GROUND) {
                sampleLambertian((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), v3)
                if (xEdge) { dx = -nx * v3[2]!; dy = v3[0]!; dz = v3[1]! } else { dx = v3[0]!; dy = -ny * v3[2]!; dz = v3[1]! }
                if (polar) { pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)); pin[0] = dx; pin[1] = dy; pin[2] = dz; randomPolarizationIn(pol) }
                break
              }
              // polished: glass → air through the edge (crossings.ts curvedCrossing, normal (nx, ny, 0))
              const nz = 0
              const cosI = dx * nx + dy * ny + dz * nz
              const eta = nS / 1
              const sin2T = eta * eta * (1 - cosI * cosI)
              if (sin2T >= 1
                ? (!polar || (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = nx, pin[4] = ny, pin[5] = nz, pin[6] = cosI, pin[7] = sin2T, pin[8] = nS, pin[9] = 1, polarizedTirIn(pol)))
                : (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = nx, pin[4] = ny, pin[5] = nz, pin[6] = cosI, pin[7] = Math.sqrt(1 - sin2T), pin[8] = nS, pin[9] = 1, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, Math.sqrt(1 - sin2T), nS, 1)))) {
                dx -= 2 * cosI * nx; dy -= 2 * cosI * ny; dz -= 2 * cosI * nz
                break
              }
              end = END_EDGE // left through the edge
              break
            }
          } else pathUm = dz > 0 ? tUm / dz : -tUm / dz
          if (alpha > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alpha * pathUm) { end = T_SUBSTRATE; break }
          if (dz < 0) {
            // bottom face: substrate → emitter layer (then the reflector)
            z = 0
            if (trackPos) { x += dx * pathUm; y += dy * pathUm }
            if (tfAt > 0) {
              // the thin-film stack: its own coherent reflection, else absorbed in it (steps.ts stackStep)
              // thinfilm/source.ts stackCoefficients, inlined by hand: r_s, r_p linear in μ = −dz between grid points
              const mx = (-dz > 1 ? 1 : -dz) * tfRA
              let k = mx | 0
              if (k > tfRA - 1) k = tfRA - 1
              const f = mx - k
              let q = tfNodes + tfNode * tfNL + tfR + k, v = scene[q]!
              const rsRe = v + f * (scene[q + 1]! - v)
              q += tfRn; v = scene[q]!
              const rsIm = v + f * (scene[q + 1]! - v)
              q += tfRn; v = scene[q]!
              const rpRe = v + f * (scene[q + 1]! - v)
              q += tfRn; v = scene[q]!
              const rpIm = v + f * (scene[q + 1]! - v)
              const us = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))
              if (polar) {
                pin[0] = dx; pin[1] = dy; pin[2] = dz
                pin[3] = rsRe; pin[4] = rsIm; pin[5] = rpRe; pin[6] = rpIm; pin[10] = us
                if (!stackReflectsIn(pol)) { end = T_STACK_ABSORBED; break }
              } else if (!(us < 0.5 * (rsRe * rsRe + rsIm * rsIm + rpRe * rpRe + rpIm * rpIm))) { end = T_STACK_ABSORBED; break }
              dz = -dz
              break
            }
            const cosI = -dz
            const eta = nS / nE
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1) { if (polar) (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = -1, pin[6] = cosI, pin[7] = sin2T, pin[8] = nS, pin[9] = nE, polarizedTirIn(pol)); dz = cosI; break }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && nE !== nS && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = -1, pin[6] = cosI, pin[7] = cosT, pin[8] = nS, pin[9] = nE, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, nS, nE))) { dz = cosI; break }
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
                if (sin2T >= 1) { if (polar) (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = 1, pin[6] = dz, pin[7] = sin2T, pin[8] = nS, pin[9] = nL, polarizedTirIn(pol)); dz = -dz; break }
                const cosT = Math.sqrt(1 - sin2T)
                if (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = 1, pin[6] = dz, pin[7] = cosT, pin[8] = nS, pin[9] = nL, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nS, nL))) { dz = -dz; break }
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
              if (polar) (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = 1, pin[6] = dz, pin[7] = sin2T, pin[8] = nS, pin[9] = 1, polarizedTirIn(pol))
              dz = -dz
              break
            }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = 1, pin[6] = dz, pin[7] = cosT, pin[8] = nS, pin[9] = 1, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), dz, cosT, nS, 1))) { dz = -dz; break }
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
            if (alphaL > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alphaL * tS) { end = T_SUBSTRATE; break }
            x += dx * tS; y += dy * tS; z += dz * tS
            // outward normal (see geometry.ts)
            let nx = cv * x, ny = cv * y, nz = 1 - k1 * cv * (zv - z)
            if (measured !== null) { measuredCapNormal(x, y, v3); nx = v3[0]!; ny = v3[1]!; nz = v3[2]! }
            const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
            nx *= inv; ny *= inv; nz *= inv
            const cosI = dx * nx + dy * ny + dz * nz
            const eta = nL
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1
              ? (!polar || (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = nx, pin[4] = ny, pin[5] = nz, pin[6] = cosI, pin[7] = sin2T, pin[8] = nL, pin[9] = 1, polarizedTirIn(pol)))
              : (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = nx, pin[4] = ny, pin[5] = nz, pin[6] = cosI, pin[7] = Math.sqrt(1 - sin2T), pin[8] = nL, pin[9] = 1, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, Math.sqrt(1 - sin2T), nL, 1)))) {
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
          if (alphaL > 0 && -Math.log((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!))) < alphaL * tB) { end = T_SUBSTRATE; break }
          x += dx * tB; y += dy * tB; z = tUm
          if (nL !== nS) {
            const cosI = -dz
            const eta = nL / nS
            const sin2T = eta * eta * (1 - cosI * cosI)
            if (sin2T >= 1) { if (polar) (pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = -1, pin[6] = cosI, pin[7] = sin2T, pin[8] = nL, pin[9] = nS, polarizedTirIn(pol)); dz = cosI; onCap = false; break }
            const cosT = Math.sqrt(1 - sin2T)
            if (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = -1, pin[6] = cosI, pin[7] = cosT, pin[8] = nL, pin[9] = nS, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, nL, nS))) { dz = cosI; onCap = false; break }
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
          const tau = airHit[0]!
          x += dx * tau; y += dy * tau; z += dz * tau
          if (kind === AIR_LAND) {
            z = tUm
            const cosI = -dz
            const eta = 1 / nS
            const cosT = Math.sqrt(1 - eta * eta * (1 - cosI * cosI))
            if (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = 0, pin[4] = 0, pin[5] = -1, pin[6] = cosI, pin[7] = cosT, pin[8] = 1, pin[9] = nS, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, 1, nS))) { dz = cosI; excludeSelf = false; break }
            dx *= eta; dy *= eta; dz = -cosT
            med = MED_SUBSTRATE
            break
          }
          // a cap: move the origin to its site
          x -= airHit[1]!; y -= airHit[2]!; ox += airHit[1]!; oy += airHit[2]!
          let nx = cv * x, ny = cv * y, nz = 1 - k1 * cv * (zv - z)
          if (measured !== null) { measuredCapNormal(x, y, v3); nx = v3[0]!; ny = v3[1]!; nz = v3[2]! }
          const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
          nx *= inv; ny *= inv; nz *= inv
          const cosI = -(dx * nx + dy * ny + dz * nz)
          const eta = 1 / nL
          const cosT = Math.sqrt(1 - eta * eta * (1 - cosI * cosI))
          if (!noFresnel && (polar ? (pin[10] = (ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), pin[0] = dx, pin[1] = dy, pin[2] = dz, pin[3] = -nx, pin[4] = -ny, pin[5] = -nz, pin[6] = cosI, pin[7] = cosT, pin[8] = 1, pin[9] = nL, polarizedReflectsIn(pol)) : fresnelReflects((ui < UB ? ubuf[ui++]! : (fillUniforms(rng, ubuf), (ui = 1), ubuf[0]!)), cosI, cosT, 1, nL))) {
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
    let bt = -1 // 1° polar bin of an extracted ray
    switch (end) {
      case T_EXTRACTED: {
        // film.ts scoreExit, inlined by hand (a call here cost the planar bench ~10 %)
        nExt++
        const th = Math.acos(dz > 1 ? 1 : dz) // |d| = 1 up to rounding; acos(1 + 1e-16) would be NaN
        bt = (th * RAD_TO_THETA_BIN) | 0
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
        if (pa > 0) scoreSpot(tally, pb, scene, pa, x + ox, y + oy, dz, bt) // the panel's detector
        break
      }
      case END_EDGE: nEdge++; break
      case T_REFLECTOR: nRefl++; break
      case T_SUBSTRATE: nSub++; break
      case T_WAVEGUIDED: nWg++; break
      case T_TRAPPED: nTrap++; break
      case T_STACK_ABSORBED: nStack++; break
      default: nUnres++; break
    }
    if (colour) {
      // film.ts scoreColour, inlined by hand
      tally[launchRow + wb] = tally[launchRow + wb]! + 1
      if (bt >= 0) {
        const b = colourAt + (bt >> 1) * colourBins + wb
        tally[b] = tally[b]! + 1
        if (bt < axisBins) tally[axisRow + wb] = tally[axisRow + wb]! + 1
      }
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
  tally[T_STACK_ABSORBED] = tally[T_STACK_ABSORBED]! + nStack
  if (pa > 0) tally[pb + PT_EDGE] = tally[pb + PT_EDGE]! + nEdge
  if (source !== SOURCE_EXTENDED) tally[T_PIXEL_RAYS] = tally[T_PIXEL_RAYS]! + done
  return done
}
