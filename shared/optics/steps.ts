// The readable model of a ray's life: one function per medium, each taking the ray one event further and
// returning the medium it is in next, or RAY_ENDED with its tally slot in ray.end. This is the reference: physics
// lands here first, then in the fused loop (tracer.ts), and tests/unit/optics/model-equality.test.ts proves the
// two give bit-identical tallies (the same draws from the random stream in the same order, the same arithmetic).
// Frame z up, µm; the emitter layer at z = 0 (zero thickness, the reflector directly under it), the substrate's
// top face at z = t, cap vertices at z = t + h. Snell/Fresnel only through crossings.ts. With a thin-film source
// (thinfilm/source.ts) rays start in the substrate at z = 0 and the OLED stack takes the place of the emitter layer
// and reflector: stackStep reflects with its coherent r_s, r_p or ends the ray as stackAbsorbed. On a finite panel
// (panel.ts) substrate segments end at the glass edges too (panelSubstrateStep, edgeStep).
import { AIR_ESCAPE, AIR_LAND, AIR_LOST, airHit, airSearch, setAirSearchMeasured } from './air-search'
import {
  CROSS_TIR, CROSS_TRANSMIT, curvedCrossing, flatCrossing, linearPolarizationIn, metalReflect, metalReflectNormalIn, pin, randomPolarization, stackReflectsIn,
} from './crossings'
import {
  EDGE_ABSORBING, EDGE_GROUND, EDGE_MIRRORED, END_EDGE, P_EDGE_KIND, P_EMIT_HEIGHT_UM, P_EMIT_WIDTH_UM, P_HALF_HEIGHT_UM, P_HALF_WIDTH_UM, panelEdgeHit,
} from './panel'
import { sampleThinFilmLaunch, stackCoefficients, thinFilmNode } from './thinfilm/source'
import { capHit, capNormal } from './geometry'
import { HEX_ROW_FACTOR, sampleCell, wrapToSite } from './lattice'
import { measuredCapHit, measuredCapNormal, setMeasuredCap } from './measured-cap'
import { draw, MEDIUM_AIR, MEDIUM_EMITTER, MEDIUM_LENS, MEDIUM_SUBSTRATE, RAY_ENDED, type Ray } from './ray'
import { sampleWavelength, SP_AL, SP_AS, SP_NE, SP_NL, SP_NS, spectralValue } from './spectral'
import { sampleDisc, sampleIsotropic, sampleLambertian, sampleRectangle, sampleTabulated } from './sampling'
import {
  FRESNEL_NONE, FRESNEL_POLARIZED, LATTICE_SQUARE, measuredProfileOf, PROFILE_ISOTROPIC, PROFILE_LAMBERTIAN, S_ABSORPTION_PER_UM,
  S_CURVATURE_PER_UM, S_DIFFUSE_FRACTION, S_FRESNEL, S_HAS_LENS, S_K1, S_LATTICE, S_LENS_ABSORPTION_PER_UM, S_LENS_RADIUS_UM, S_MAX_EVENTS, S_SPECTRAL_OFFSET,
  S_N_EMITTER, S_N_LENS, S_N_SUBSTRATE, S_PITCH_UM, S_PROFILE, S_REFLECTANCE, S_SAG_UM, S_SOURCE, S_SOURCE_A_UM,
  S_PANEL_OFFSET, S_SOURCE_B_UM, S_TABLE, S_THICKNESS_UM, S_THINFILM_OFFSET, SOURCE_DISC, SOURCE_EXTENDED, type PackedScene,
} from './scene'
import { T_EXTRACTED, T_REFLECTOR, T_STACK_ABSORBED, T_SUBSTRATE, T_TRAPPED, T_UNRESOLVED, T_WAVEGUIDED } from './tally'

/** The packed scene read once into named fields (µm, 1/µm; indices; booleans for the modes). */
export interface Stack {
  scene: PackedScene
  hasLens: boolean
  nEmitter: number; nSubstrate: number; nLens: number
  thicknessUm: number; absorptionPerUm: number; lensAbsorptionPerUm: number
  /** Offset of the spectral block (spectral.ts), 0 without a spectrum. */
  spectralAt: number
  /** Offset of the thin-film block (thinfilm/source.ts), 0 for the sheet emitter. */
  thinFilmAt: number
  reflectance: number; diffuseFraction: number
  hexagonal: boolean; pitchUm: number; lensRadiusUm: number; sagUm: number; curvaturePerUm: number; k1: number
  measured: boolean
  profile: number; source: number; sourceAUm: number; sourceBUm: number
  fresnel: boolean
  /** Fresnel mode "polarized": the ray's field is tracked (ray.pol). */
  polarized: boolean
  maxEvents: number
  /** Offset of the finite panel's block (panel.ts), 0 for the infinite array; its half-sizes, emitting size (µm), edge kind. */
  panelAt: number
  halfWidthUm: number; halfHeightUm: number; emitWidthUm: number; emitHeightUm: number; edgeKind: number
  /**
   * A totally reflected ray of the planar device with a specular reflector can never escape (trapped at once): true
   * for the infinite array and a panel with mirrored edges (which keep n·sinθ); other edges end or turn such rays.
   */
  trapsAtTop: boolean
}

/**
 * Reads a packed scene and makes it the one being traced (the measured-cap profile and the air search follow
 * it: module state, as in the fused loop).
 */
export function stackOf(scene: PackedScene): Stack {
  const measured = measuredProfileOf(scene)
  setMeasuredCap(measured, scene[S_LENS_RADIUS_UM]!, scene[S_SAG_UM]!)
  setAirSearchMeasured(measured !== null)
  return {
    scene,
    hasLens: scene[S_HAS_LENS]! !== 0,
    nEmitter: scene[S_N_EMITTER]!, nSubstrate: scene[S_N_SUBSTRATE]!, nLens: scene[S_N_LENS]!,
    thicknessUm: scene[S_THICKNESS_UM]!, absorptionPerUm: scene[S_ABSORPTION_PER_UM]!, lensAbsorptionPerUm: scene[S_LENS_ABSORPTION_PER_UM]!,
    spectralAt: scene[S_SPECTRAL_OFFSET]!,
    thinFilmAt: scene[S_THINFILM_OFFSET]!,
    reflectance: scene[S_REFLECTANCE]!, diffuseFraction: scene[S_DIFFUSE_FRACTION]!,
    hexagonal: scene[S_LATTICE]! !== LATTICE_SQUARE, pitchUm: scene[S_PITCH_UM]!, lensRadiusUm: scene[S_LENS_RADIUS_UM]!,
    sagUm: scene[S_SAG_UM]!, curvaturePerUm: scene[S_CURVATURE_PER_UM]!, k1: scene[S_K1]!,
    measured: measured !== null,
    profile: scene[S_PROFILE]!, source: scene[S_SOURCE]!, sourceAUm: scene[S_SOURCE_A_UM]!, sourceBUm: scene[S_SOURCE_B_UM]!,
    fresnel: scene[S_FRESNEL]! !== FRESNEL_NONE,
    polarized: scene[S_FRESNEL]! === FRESNEL_POLARIZED,
    maxEvents: scene[S_MAX_EVENTS]!,
    ...panelOf(scene),
  }
}

type PanelFields = 'panelAt' | 'halfWidthUm' | 'halfHeightUm' | 'emitWidthUm' | 'emitHeightUm' | 'edgeKind' | 'trapsAtTop'
function panelOf(scene: PackedScene): Pick<Stack, PanelFields> {
  const pa = scene[S_PANEL_OFFSET]!
  const specular = scene[S_DIFFUSE_FRACTION]! === 0 || scene[S_REFLECTANCE]! === 0
  if (!(pa > 0)) {
    return { panelAt: 0, halfWidthUm: Infinity, halfHeightUm: Infinity, emitWidthUm: 0, emitHeightUm: 0, edgeKind: EDGE_ABSORBING, trapsAtTop: specular }
  }
  const edgeKind = scene[pa + P_EDGE_KIND]!
  return {
    panelAt: pa, halfWidthUm: scene[pa + P_HALF_WIDTH_UM]!, halfHeightUm: scene[pa + P_HALF_HEIGHT_UM]!,
    emitWidthUm: scene[pa + P_EMIT_WIDTH_UM]!, emitHeightUm: scene[pa + P_EMIT_HEIGHT_UM]!, edgeKind,
    trapsAtTop: specular && edgeKind === EDGE_MIRRORED,
  }
}

/** Sees the ray's path: absolute positions (x + ox, y + oy, z) in µm, in order. */
export interface RayRecorder {
  /** A new ray (its index in the stream) before launch. */
  start(rayIndex: number): void
  /** The ray is at this point: its launch, every interface or reflector it meets, and where it is absorbed. */
  vertex(x: number, y: number, z: number): void
  /** The ray's life is over (ray.end holds its tally slot; ray.dx, dy, dz its last direction). */
  finish(ray: Ray): void
}

const v3 = new Float64Array(3)
const cell = new Float64Array(2)
const site = new Float64Array(3)
const rc = new Float64Array(4)
const edge = new Float64Array(2)

function end(ray: Ray, slot: number): number {
  ray.end = slot
  return RAY_ENDED
}

function at(ray: Ray, rec: RayRecorder | undefined): void {
  if (rec !== undefined) rec.vertex(ray.x + ray.ox, ray.y + ray.oy, ray.z)
}

/** Beer–Lambert: an exponential free path −ln(u)/α against the segment; true when the ray is absorbed on it. */
function absorbedOn(ray: Ray, alpha: number, pathUm: number, rec: RayRecorder | undefined): boolean {
  if (!(alpha > 0)) return false
  const free = -Math.log(draw(ray))
  if (!(free < alpha * pathUm)) return false
  if (rec !== undefined) {
    const s = free / alpha
    rec.vertex(ray.x + ray.ox + ray.dx * s, ray.y + ray.oy + ray.dy * s, ray.z + ray.dz * s)
  }
  return true
}

/** Outward unit normal of the current site's cap at the ray's position (geometry.ts; measured-cap.ts). */
function capNormalAt(ray: Ray, st: Stack, out: Float64Array): void {
  if (!st.measured) { capNormal(ray.x, ray.y, ray.z, st.thicknessUm + st.sagUm, st.curvaturePerUm, st.k1, out); return }
  measuredCapNormal(ray.x, ray.y, out)
  const nx = out[0]!, ny = out[1]!, nz = out[2]!
  const inv = 1 / Math.sqrt(nx * nx + ny * ny + nz * nz)
  out[0] = nx * inv; out[1] = ny * inv; out[2] = nz * inv
}

/**
 * Launch: a position in the source (drawn even for an extended source, so streams line up between variants),
 * then a direction from the angular profile. The ray starts in the emitter layer.
 * Thin-film source: the position, the wavelength (with a spectrum), then the polarisation (s or p), μ and φ from the
 * stack's emission into the glass at the ray's wavelength node; the ray starts in the glass at z = 0 going up.
 */
/**
 * The ray's wavelength from the spectrum (one draw) and its indices and absorption there (spectral.ts), or the
 * monochromatic 550 nm values without a spectrum; `cellOut` receives the spectral cell and the fraction within it.
 * Shared by the forward launch and the reciprocal (backward) paths.
 */
export function drawWavelength(ray: Ray, st: Stack, cellOut: Float64Array): void {
  if (st.spectralAt > 0) {
    const at = st.spectralAt
    ray.wavelengthNm = sampleWavelength(st.scene, at, draw(ray), cellOut)
    const j = cellOut[0]!, f = cellOut[1]!
    ray.nE = spectralValue(st.scene, at, SP_NE, j, f); ray.nS = spectralValue(st.scene, at, SP_NS, j, f)
    ray.nL = spectralValue(st.scene, at, SP_NL, j, f)
    ray.alphaS = spectralValue(st.scene, at, SP_AS, j, f); ray.alphaL = spectralValue(st.scene, at, SP_AL, j, f)
  } else {
    ray.wavelengthNm = 550
    ray.nE = st.nEmitter; ray.nS = st.nSubstrate; ray.nL = st.nLens; ray.alphaS = st.absorptionPerUm; ray.alphaL = st.lensAbsorptionPerUm
  }
}

export function launch(ray: Ray, st: Stack, rec?: RayRecorder): void {
  const u1 = draw(ray), u2 = draw(ray)
  // a finite panel: uniform over its emitting area (absolute position; the first top-face wrap finds the lens site)
  if (st.panelAt > 0) sampleRectangle(st.emitWidthUm, st.emitHeightUm, u1, u2, v3)
  else if (st.source === SOURCE_EXTENDED) sampleCell(st.hexagonal, st.pitchUm, u1, u2, v3)
  else if (st.source === SOURCE_DISC) sampleDisc(st.sourceAUm, u1, u2, v3)
  else sampleRectangle(st.sourceAUm, st.sourceBUm, u1, u2, v3)
  ray.x = v3[0]!; ray.y = v3[1]!; ray.z = 0
  const tf = st.thinFilmAt > 0
  if (!tf) {
    if (st.profile === PROFILE_ISOTROPIC) sampleIsotropic(draw(ray), draw(ray), v3)
    else if (st.profile === PROFILE_LAMBERTIAN) sampleLambertian(draw(ray), draw(ray), v3)
    else sampleTabulated(st.scene, S_TABLE, draw(ray), draw(ray), draw(ray), v3)
    ray.dx = v3[0]!; ray.dy = v3[1]!; ray.dz = v3[2]!
    if (st.polarized) randomPolarization(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz) // unpolarised: a random linear state
  }
  drawWavelength(ray, st, cell)
  if (tf) {
    // the stack's node nearest the middle of the ray's spectral cell (the cell the source tables weighed)
    ray.tfNode = st.spectralAt > 0 ? thinFilmNode(st.scene, st.thinFilmAt, st.scene[st.spectralAt]! + (cell[0]! + 0.5) * st.scene[st.spectralAt + 1]!) : 0
    const uPol = draw(ray), uTheta = draw(ray), uPhi = draw(ray)
    const isP = sampleThinFilmLaunch(st.scene, st.thinFilmAt, ray.tfNode, uPol, uTheta, uPhi, v3)
    ray.dx = v3[0]!; ray.dy = v3[1]!; ray.dz = v3[2]!
    if (st.polarized) { pin[0] = ray.dx; pin[1] = ray.dy; pin[2] = ray.dz; pin[10] = isP; linearPolarizationIn(ray.pol) }
    ray.medium = MEDIUM_SUBSTRATE
  } else ray.medium = MEDIUM_EMITTER
  at(ray, rec)
}

/**
 * The thin-film stack met from the glass (the ray at z = 0 going down): reflected with the stack's own coherent
 * R(θ, λ) — polarised: the complex r_s, r_p on the ray's field; otherwise (R_s + R_p)/2, one uniform either way —
 * else absorbed in the stack (stackAbsorbed).
 */
export function stackStep(ray: Ray, st: Stack): number {
  stackCoefficients(st.scene, st.thinFilmAt, ray.tfNode, -ray.dz, rc)
  const u = draw(ray)
  if (st.polarized) {
    pin[0] = ray.dx; pin[1] = ray.dy; pin[2] = ray.dz
    pin[3] = rc[0]!; pin[4] = rc[1]!; pin[5] = rc[2]!; pin[6] = rc[3]!; pin[10] = u
    if (!stackReflectsIn(ray.pol)) return end(ray, T_STACK_ABSORBED)
  } else if (!(u < 0.5 * (rc[0]! * rc[0]! + rc[1]! * rc[1]! + rc[2]! * rc[2]! + rc[3]! * rc[3]!))) return end(ray, T_STACK_ABSORBED)
  ray.dz = -ray.dz
  ray.bounces++
  return MEDIUM_SUBSTRATE
}

/**
 * Emitter layer. Going down: the reflector (absorbed with 1 − R; else cosine-weighted upward with probability
 * diffuseFraction, else mirrored). Going up: into the substrate; TIR there leaves the ray guided in the
 * emitter layers (waveguided); a Fresnel reflection sends it down to the reflector.
 */
export function emitterStep(ray: Ray, st: Stack): number {
  if (ray.dz < 0) {
    if (draw(ray) >= st.reflectance) return end(ray, T_REFLECTOR)
    ray.bounces++
    if (st.diffuseFraction > 0 && draw(ray) < st.diffuseFraction) {
      sampleLambertian(draw(ray), draw(ray), v3)
      ray.dx = v3[0]!; ray.dy = v3[1]!; ray.dz = v3[2]!
      if (st.polarized) randomPolarization(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz) // diffuse re-emission depolarises
    } else {
      if (st.polarized) metalReflect(ray.pol, ray.dx, ray.dy, ray.dz) // ideal metal: rs = −1, rp = +1
      ray.dz = -ray.dz
    }
    return MEDIUM_EMITTER
  }
  const c = flatCrossing(ray, true, ray.nE, ray.nS, st.fresnel && ray.nE !== ray.nS, st.polarized)
  if (c === CROSS_TIR) return end(ray, T_WAVEGUIDED)
  if (c !== CROSS_TRANSMIT) { ray.bounces++; return MEDIUM_EMITTER }
  return MEDIUM_SUBSTRATE
}

/**
 * Substrate, face to face (z is 0 or t on entry). Beer–Lambert on the way. Bottom face: back into the emitter
 * layer (TIR or Fresnel: up again), or with a thin-film source the stack (stackStep). Top face: wrap to the nearest
 * lattice site; inside its base disc, into the lens material (an interface only when the indices differ); else the
 * flat land into air (with no lens array that is the exit; in the planar device with a specular reflector a TIR ray can never escape: trapped).
 */
export function substrateStep(ray: Ray, st: Stack, rec?: RayRecorder): number {
  const tUm = st.thicknessUm
  if (st.panelAt > 0) return panelSubstrateStep(ray, st, rec)
  const pathUm = ray.dz > 0 ? tUm / ray.dz : -tUm / ray.dz
  if (absorbedOn(ray, ray.alphaS, pathUm, rec)) return end(ray, T_SUBSTRATE)
  return substrateFace(ray, st, pathUm, rec)
}

/**
 * Substrate of a finite panel: from wherever the ray is (a face, or an edge after an edge event) towards the face
 * ahead; when the segment meets an edge first (panel.ts panelEdgeHit on the absolute position) the ray stops there,
 * Beer–Lambert on the shortened segment, and the edge acts (edgeStep: one event).
 */
function panelSubstrateStep(ray: Ray, st: Stack, rec: RayRecorder | undefined): number {
  const pathUm = ray.dz > 0 ? (st.thicknessUm - ray.z) / ray.dz : ray.dz < 0 ? -ray.z / ray.dz : Infinity
  panelEdgeHit(ray.x + ray.ox, ray.y + ray.oy, ray.dx, ray.dy, st.halfWidthUm, st.halfHeightUm, edge)
  const sE = edge[0]!
  if (!(sE < pathUm)) {
    if (absorbedOn(ray, ray.alphaS, pathUm, rec)) return end(ray, T_SUBSTRATE)
    return substrateFace(ray, st, pathUm, rec)
  }
  if (absorbedOn(ray, ray.alphaS, sE, rec)) return end(ray, T_SUBSTRATE)
  ray.x += ray.dx * sE; ray.y += ray.dy * sE; ray.z += ray.dz * sE
  // onto the edge exactly (absolute), so rounding never leaves the ray outside the glass
  if (edge[1] === 1) ray.x = (ray.dx > 0 ? st.halfWidthUm : -st.halfWidthUm) - ray.ox
  else ray.y = (ray.dy > 0 ? st.halfHeightUm : -st.halfHeightUm) - ray.oy
  at(ray, rec)
  return edgeStep(ray, st, edge[1] === 1)
}

/**
 * The edge the ray has just reached (xEdge: a face x = ±hw, else y = ±hh), outward normal along the ray's lateral
 * sense: absorbed (edge slot), mirrored (ideal metal), ground (Lambert about the inward normal, depolarised) or
 * polished (Fresnel / TIR into air; transmitted light leaves through the edge: edge slot).
 */
export function edgeStep(ray: Ray, st: Stack, xEdge: boolean): number {
  const k = st.edgeKind
  if (k === EDGE_ABSORBING) return end(ray, END_EDGE)
  const nx = xEdge ? (ray.dx > 0 ? 1 : -1) : 0, ny = xEdge ? 0 : (ray.dy > 0 ? 1 : -1)
  ray.bounces++
  if (k === EDGE_MIRRORED) {
    const cosI = xEdge ? ray.dx * nx : ray.dy * ny
    if (st.polarized) { pin[0] = ray.dx; pin[1] = ray.dy; pin[2] = ray.dz; pin[3] = nx; pin[4] = ny; pin[5] = 0; pin[6] = cosI; metalReflectNormalIn(ray.pol) }
    if (xEdge) ray.dx -= 2 * cosI * nx
    else ray.dy -= 2 * cosI * ny
    return MEDIUM_SUBSTRATE
  }
  if (k === EDGE_GROUND) {
    sampleLambertian(draw(ray), draw(ray), v3)
    // the cosine-weighted axis (v3[2]) along the inward normal, the two tangential parts across the edge face
    if (xEdge) { ray.dx = -nx * v3[2]!; ray.dy = v3[0]!; ray.dz = v3[1]! } else { ray.dx = v3[0]!; ray.dy = -ny * v3[2]!; ray.dz = v3[1]! }
    if (st.polarized) randomPolarization(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz)
    return MEDIUM_SUBSTRATE
  }
  const c = curvedCrossing(ray, nx, ny, 0, ray.nS, 1, st.fresnel, st.polarized)
  if (c === CROSS_TRANSMIT) { ray.bounces--; return end(ray, END_EDGE) }
  return MEDIUM_SUBSTRATE
}

/** The substrate segment of length pathUm ends at the bottom or the top face (substrateStep, after Beer–Lambert). */
function substrateFace(ray: Ray, st: Stack, pathUm: number, rec: RayRecorder | undefined): number {
  const tUm = st.thicknessUm
  // (the fused loop skips moving the ray when no result depends on its lateral position; the model always moves it)
  if (ray.dz < 0) {
    ray.z = 0
    ray.x += ray.dx * pathUm; ray.y += ray.dy * pathUm
    at(ray, rec)
    if (st.thinFilmAt > 0) return stackStep(ray, st)
    const c = flatCrossing(ray, false, ray.nS, ray.nE, st.fresnel && ray.nE !== ray.nS, st.polarized)
    if (c === CROSS_TIR) { ray.dz = -ray.dz; ray.bounces++; return MEDIUM_SUBSTRATE }
    if (c !== CROSS_TRANSMIT) { ray.bounces++; return MEDIUM_SUBSTRATE }
    return MEDIUM_EMITTER
  }
  ray.z = tUm
  ray.x += ray.dx * pathUm; ray.y += ray.dy * pathUm
  at(ray, rec)
  if (st.hasLens) {
    wrapToSite(st.hexagonal, st.pitchUm, 2 * st.pitchUm * HEX_ROW_FACTOR, ray.x, ray.y, site)
    const sx = site[1]!, sy = site[2]!
    ray.x -= sx; ray.y -= sy; ray.ox += sx; ray.oy += sy
    if (ray.x * ray.x + ray.y * ray.y < st.lensRadiusUm * st.lensRadiusUm) {
      if (ray.nL !== ray.nS) {
        const c = flatCrossing(ray, true, ray.nS, ray.nL, st.fresnel, st.polarized)
        if (c === CROSS_TIR) { ray.dz = -ray.dz; ray.bounces++; return MEDIUM_SUBSTRATE }
        if (c !== CROSS_TRANSMIT) { ray.bounces++; return MEDIUM_SUBSTRATE }
      }
      ray.onCap = false
      return MEDIUM_LENS
    }
  }
  const c = flatCrossing(ray, true, ray.nS, 1, st.fresnel, st.polarized)
  if (c === CROSS_TIR) {
    if (!st.hasLens && st.trapsAtTop) return end(ray, T_TRAPPED)
    ray.dz = -ray.dz; ray.bounces++
    return MEDIUM_SUBSTRATE
  }
  if (c !== CROSS_TRANSMIT) { ray.bounces++; return MEDIUM_SUBSTRATE }
  if (!st.hasLens) return end(ray, T_EXTRACTED)
  ray.excludeSelf = false
  return MEDIUM_AIR
}

/**
 * Lens material above a base disc (coordinates relative to its site): the cap surface or the base, whichever comes
 * first. At the cap: refraction into air, or TIR/Fresnel back into the lens. At the base: back into the substrate
 * (an interface when the indices differ). Beer–Lambert with the substrate's absorption on every segment.
 */
export function lensStep(ray: Ray, st: Stack, rec?: RayRecorder): number {
  const tUm = st.thicknessUm, zv = tUm + st.sagUm
  const tS = st.measured
    ? measuredCapHit(ray.x, ray.y, ray.z, ray.dx, ray.dy, ray.dz, zv, ray.onCap)
    : capHit(ray.x, ray.y, ray.z, ray.dx, ray.dy, ray.dz, zv, st.curvaturePerUm, st.k1, st.sagUm, ray.onCap)
  const tB = ray.dz < 0 ? (tUm - ray.z) / ray.dz : Infinity
  if (tS > 0 && tS < tB) {
    if (absorbedOn(ray, ray.alphaL, tS, rec)) return end(ray, T_SUBSTRATE)
    ray.x += ray.dx * tS; ray.y += ray.dy * tS; ray.z += ray.dz * tS
    at(ray, rec)
    capNormalAt(ray, st, v3)
    const c = curvedCrossing(ray, v3[0]!, v3[1]!, v3[2]!, ray.nL, 1, st.fresnel, st.polarized)
    if (c !== CROSS_TRANSMIT) { ray.onCap = true; ray.bounces++; return MEDIUM_LENS }
    ray.excludeSelf = true
    return MEDIUM_AIR
  }
  if (tB === Infinity) return end(ray, T_UNRESOLVED) // no exit found (numerically degenerate ray)
  if (absorbedOn(ray, ray.alphaL, tB, rec)) return end(ray, T_SUBSTRATE)
  ray.x += ray.dx * tB; ray.y += ray.dy * tB; ray.z = tUm
  at(ray, rec)
  if (ray.nL !== ray.nS) {
    const c = flatCrossing(ray, false, ray.nL, ray.nS, st.fresnel, st.polarized)
    if (c === CROSS_TIR) { ray.dz = -ray.dz; ray.onCap = false; ray.bounces++; return MEDIUM_LENS }
    if (c !== CROSS_TRANSMIT) { ray.onCap = false; ray.bounces++; return MEDIUM_LENS }
  }
  return MEDIUM_SUBSTRATE
}

/**
 * Air below the cap tops (air-search.ts): the first cap or land the ray meets, else it escapes (extracted). Into a
 * cap: refraction into the lens (its site becomes the origin) or a Fresnel reflection off it; onto the land:
 * into the substrate or a Fresnel reflection back up.
 */
export function airStep(ray: Ray, st: Stack, rec?: RayRecorder): number {
  const kind = airSearch(ray.x, ray.y, ray.z, ray.dx, ray.dy, ray.dz, ray.excludeSelf, st.hexagonal, st.pitchUm,
    st.lensRadiusUm, st.sagUm, st.thicknessUm, st.curvaturePerUm, st.k1)
  if (kind === AIR_ESCAPE) return end(ray, T_EXTRACTED)
  if (kind === AIR_LOST) return end(ray, T_UNRESOLVED)
  const tau = airHit[0]!
  ray.x += ray.dx * tau; ray.y += ray.dy * tau; ray.z += ray.dz * tau
  if (kind === AIR_LAND) {
    ray.z = st.thicknessUm
    at(ray, rec)
    ray.bounces++ // back into the film from air, whatever happens next
    const c = flatCrossing(ray, false, 1, ray.nS, st.fresnel, st.polarized)
    if (c !== CROSS_TRANSMIT) { ray.excludeSelf = false; return MEDIUM_AIR }
    return MEDIUM_SUBSTRATE
  }
  const sx = airHit[1]!, sy = airHit[2]!
  ray.x -= sx; ray.y -= sy; ray.ox += sx; ray.oy += sy
  at(ray, rec)
  ray.bounces++
  capNormalAt(ray, st, v3)
  // the normal on the lens side (into the far medium) is the inward one
  const c = curvedCrossing(ray, -v3[0]!, -v3[1]!, -v3[2]!, 1, ray.nL, st.fresnel, st.polarized)
  if (c !== CROSS_TRANSMIT) { ray.excludeSelf = true; return MEDIUM_AIR } // a convex cap cannot be met twice by a straight ray
  ray.onCap = true
  return MEDIUM_LENS
}

/**
 * Runs one launched ray to its end: more than `maxEvents` steps (the scene's limit, or less when the caller's event
 * budget is nearly spent) end it as unresolved.
 */
export function traceRay(ray: Ray, st: Stack, rec?: RayRecorder, maxEvents = st.maxEvents): void {
  let medium = ray.medium
  while (medium !== RAY_ENDED) {
    if (++ray.events > maxEvents) { ray.end = T_UNRESOLVED; break }
    ray.medium = medium
    switch (medium) {
      case MEDIUM_EMITTER: medium = emitterStep(ray, st); break // nothing moves in the zero-thickness layer
      case MEDIUM_SUBSTRATE: medium = substrateStep(ray, st, rec); break
      case MEDIUM_LENS: medium = lensStep(ray, st, rec); break
      default: medium = airStep(ray, st, rec); break
    }
  }
}
