// Packs a validated scenario into the flat numeric scene the tracer reads (Float64Array, fixed slots, integer
// tags). Lengths stay in µm; absorption becomes 1/µm (absorptionPerMm / 1000); angles are radians from here on.
// A scene for the planar companion (the same stack without lenses) is the same scene with S_HAS_LENS = 0.
import { DEFAULT_WAVELENGTH_NM, extinctionAt, indexAt, type IndexModel, type Scenario } from '../types/scenario'
import { buildSpectralBlock, reweightSpectralCells, SP_AL, SP_AS, SPECTRAL_BLOCK_LENGTH, SPECTRAL_GRID, spectralSlot } from './spectral'
import { conicCurvaturePerUm, shapeConicConstant } from '../types/geometry'
import { buildProfileTable, PROFILE_GRID } from './sampling'
import { buildProfile, type MonotoneProfile } from './profile'
import { thinFilmSource } from './thinfilm/source'
import {
  buildPanelBlock, P_EMIT_HEIGHT_UM, P_EMIT_WIDTH_UM, P_HALF_HEIGHT_UM, P_HALF_WIDTH_UM, P_SPOT_RADIUS_UM, P_SPOT_X_UM, P_SPOT_Y_UM, PANEL_BLOCK_LENGTH,
} from './panel'

export const S_HAS_LENS = 0
export const S_N_EMITTER = 1
export const S_N_SUBSTRATE = 2
export const S_N_LENS = 3
export const S_THICKNESS_UM = 4
export const S_ABSORPTION_PER_UM = 5
export const S_REFLECTANCE = 6
export const S_DIFFUSE_FRACTION = 7
export const S_LATTICE = 8 // 0 hexagonal, 1 square
export const S_PITCH_UM = 9
export const S_LENS_RADIUS_UM = 10 // a = D/2
export const S_SAG_UM = 11
export const S_CURVATURE_PER_UM = 12 // vertex curvature c
export const S_K1 = 13 // 1 + conic constant
export const S_PROFILE = 14 // 0 isotropic, 1 lambertian, 2 table
export const S_SOURCE = 15 // 0 extended, 1 disc, 2 rectangle
export const S_SOURCE_A_UM = 16 // disc radius or rectangle width
export const S_SOURCE_B_UM = 17 // rectangle height
export const S_FRESNEL = 18 // 0 averaged, 1 none, 2 polarized
export const S_MAX_EVENTS = 19
/** Measured cap profile (shape "measured"): knot count (0 for quadric caps) and offset of [u…, w…, m…]. */
export const S_MEASURED_KNOTS = 20
export const S_MEASURED_OFFSET = 21
/** Offset of the spectral block (spectral.ts) when the emitter has a spectrum, else 0. */
export const S_SPECTRAL_OFFSET = 22
/** Lens material absorption (1/µm): the substrate's plus 4πk/λ of a tabulated lens index. */
export const S_LENS_ABSORPTION_PER_UM = 23
/** Offset of the thin-film block (thinfilm/source.ts) when the emitter is an OLED stack, else 0. */
export const S_THINFILM_OFFSET = 24
/** Offset of the finite panel's block (panel.ts) when the scenario has a panel, else 0 (the infinite array). */
export const S_PANEL_OFFSET = 25
export const S_HEADER = 26
/** Offset of the tabulated profile grid (2·(PROFILE_GRID+1) numbers) when S_PROFILE = 2. */
export const S_TABLE = S_HEADER

export const LATTICE_HEXAGONAL = 0
export const LATTICE_SQUARE = 1
export const PROFILE_ISOTROPIC = 0
export const PROFILE_LAMBERTIAN = 1
export const PROFILE_TABLE = 2
export const SOURCE_EXTENDED = 0
export const SOURCE_DISC = 1
export const SOURCE_RECTANGLE = 2
export const FRESNEL_AVERAGED = 0
export const FRESNEL_NONE = 1
export const FRESNEL_POLARIZED = 2

export type PackedScene = Float64Array

/** Packs the scenario; `planar: true` drops the lens array (the planar companion device). */
export function packScene(sc: Scenario, opts: { planar?: boolean } = {}): PackedScene {
  const prof = sc.emitter.angularProfile
  const tableLen = typeof prof === 'object' ? 2 * (PROFILE_GRID + 1) : 0
  const lens = opts.planar ? null : sc.lensArray
  const measured = lens && lens.shape === 'measured' && lens.profile ? buildProfile(lens.profile) : null
  const spectral = sc.emitter.spectrum !== undefined
  const measuredLen = measured ? 3 * measured.u.length : 0
  // the OLED stack's tables (cached per stack, glass index and spectrum on this thread)
  const tf = sc.emitter.thinFilm ? thinFilmSource(sc) : null
  const tfLen = tf ? tf.block.length : 0
  const panelLen = sc.panel ? PANEL_BLOCK_LENGTH : 0
  const s = new Float64Array(S_HEADER + tableLen + measuredLen + (spectral ? SPECTRAL_BLOCK_LENGTH : 0) + tfLen + panelLen)
  // Indices at the monochromatic wavelength (a spectrum replaces them ray by ray from the spectral block)
  const lam = DEFAULT_WAVELENGTH_NM
  const lensIndex: IndexModel = sc.lensArray?.index ?? sc.substrate.index
  const base = sc.substrate.absorptionPerMm / 1000
  const kAbs = (m: IndexModel) => (4 * Math.PI * extinctionAt(m, lam)) / (lam / 1000)
  s[S_HAS_LENS] = lens ? 1 : 0
  s[S_N_EMITTER] = indexAt(sc.emitter.index, lam)
  s[S_N_SUBSTRATE] = indexAt(sc.substrate.index, lam)
  s[S_THICKNESS_UM] = sc.substrate.thicknessUm
  s[S_ABSORPTION_PER_UM] = base + kAbs(sc.substrate.index)
  s[S_LENS_ABSORPTION_PER_UM] = base + kAbs(lensIndex)
  // with a stack there is no separate reflector (the stack reflects; rays never enter the emitter layer): a specular
  // unit mirror, so the planar device ends totally reflected rays as trapped as for a specular sheet reflector
  s[S_REFLECTANCE] = sc.reflector ? sc.reflector.reflectance : 1
  s[S_DIFFUSE_FRACTION] = sc.reflector ? sc.reflector.diffuseFraction : 0
  const geo = sc.lensArray // the lattice still defines the launch cell of an extended source in the planar twin
  s[S_LATTICE] = geo && geo.lattice === 'square' ? LATTICE_SQUARE : LATTICE_HEXAGONAL
  s[S_PITCH_UM] = geo ? geo.pitchUm : 1
  if (lens) {
    // A measured cap ignores c and k1 (measured-cap.ts); they are the sphere's so nothing reads NaN.
    const k = lens.shape === 'measured' ? 0 : shapeConicConstant(lens.shape, lens.conicConstant)
    s[S_N_LENS] = indexAt(lensIndex, lam)
    s[S_LENS_RADIUS_UM] = lens.diameterUm / 2
    s[S_SAG_UM] = lens.sagUm
    s[S_CURVATURE_PER_UM] = conicCurvaturePerUm(lens.diameterUm, lens.sagUm, k)
    s[S_K1] = 1 + k
  } else {
    s[S_N_LENS] = s[S_N_SUBSTRATE]!
    s[S_LENS_ABSORPTION_PER_UM] = s[S_ABSORPTION_PER_UM]! // no lens: nothing reads it
  }
  if (prof === 'isotropic') s[S_PROFILE] = PROFILE_ISOTROPIC
  else if (prof === 'lambertian') s[S_PROFILE] = PROFILE_LAMBERTIAN
  else {
    s[S_PROFILE] = PROFILE_TABLE
    s.set(buildProfileTable(prof.table as Array<[number, number]>), S_TABLE)
  }
  const src = sc.emitter.source
  if (src.shape === 'extended') s[S_SOURCE] = SOURCE_EXTENDED
  else if (src.shape === 'disc') { s[S_SOURCE] = SOURCE_DISC; s[S_SOURCE_A_UM] = src.radiusUm }
  else { s[S_SOURCE] = SOURCE_RECTANGLE; s[S_SOURCE_A_UM] = src.widthUm; s[S_SOURCE_B_UM] = src.heightUm }
  s[S_FRESNEL] = sc.trace.fresnel === 'none' ? FRESNEL_NONE : sc.trace.fresnel === 'polarized' ? FRESNEL_POLARIZED : FRESNEL_AVERAGED
  s[S_MAX_EVENTS] = sc.trace.maxEvents
  if (measured) {
    const n = measured.u.length, at = S_HEADER + tableLen
    s[S_MEASURED_KNOTS] = n
    s[S_MEASURED_OFFSET] = at
    s.set(measured.u, at); s.set(measured.w, at + n); s.set(measured.m, at + 2 * n)
  }
  if (spectral) {
    const at = S_HEADER + tableLen + measuredLen
    s[S_SPECTRAL_OFFSET] = at
    s.set(buildSpectralBlock(sc, lensIndex), at)
    if (tf) {
      // rays carry the power that enters the glass: each spectral cell weighed by F·G of its node
      reweightSpectralCells(s, at, (j) => { const n = tf.nodes[tf.cellNode[j]!]!; return n.point.purcell.mixed * n.glass })
    }
  }
  if (tf) {
    const at = S_HEADER + tableLen + measuredLen + (spectral ? SPECTRAL_BLOCK_LENGTH : 0)
    s[S_THINFILM_OFFSET] = at
    s.set(tf.block, at)
  }
  if (sc.panel) {
    // the planar companion keeps the panel and its detector: it is measured the same way
    const at = S_HEADER + tableLen + measuredLen + (spectral ? SPECTRAL_BLOCK_LENGTH : 0) + tfLen
    s[S_PANEL_OFFSET] = at
    s.set(buildPanelBlock(sc.panel), at)
  }
  return s
}

/** The measured cap profile packed in a scene, or null (quadric caps, or no lens array). */
export function measuredProfileOf(scene: PackedScene): MonotoneProfile | null {
  const n = scene[S_MEASURED_KNOTS]!
  if (!(n > 0) || scene[S_HAS_LENS] === 0) return null
  const at = scene[S_MEASURED_OFFSET]!
  return { u: scene.subarray(at, at + n), w: scene.subarray(at + n, at + 2 * n), m: scene.subarray(at + 2 * n, at + 3 * n) }
}

/** Multiplies every length of a packed scene by `factor` (for scale-invariance checks; absorption scales as 1/L). */
export function scaleScene(scene: PackedScene, factor: number): PackedScene {
  const s = scene.slice()
  s[S_THICKNESS_UM] = s[S_THICKNESS_UM]! * factor
  s[S_ABSORPTION_PER_UM] = s[S_ABSORPTION_PER_UM]! / factor
  s[S_LENS_ABSORPTION_PER_UM] = s[S_LENS_ABSORPTION_PER_UM]! / factor
  const sp = s[S_SPECTRAL_OFFSET]!
  if (sp > 0) {
    for (let j = 0; j <= SPECTRAL_GRID; j++) {
      const qs = sp + spectralSlot(j, SP_AS), ql = sp + spectralSlot(j, SP_AL)
      s[qs] = s[qs]! / factor; s[ql] = s[ql]! / factor
    }
  }
  s[S_PITCH_UM] = s[S_PITCH_UM]! * factor
  s[S_LENS_RADIUS_UM] = s[S_LENS_RADIUS_UM]! * factor
  s[S_SAG_UM] = s[S_SAG_UM]! * factor
  s[S_CURVATURE_PER_UM] = s[S_CURVATURE_PER_UM]! / factor
  s[S_SOURCE_A_UM] = s[S_SOURCE_A_UM]! * factor
  s[S_SOURCE_B_UM] = s[S_SOURCE_B_UM]! * factor
  const pa = s[S_PANEL_OFFSET]!
  const lengths = [P_HALF_WIDTH_UM, P_HALF_HEIGHT_UM, P_EMIT_WIDTH_UM, P_EMIT_HEIGHT_UM, P_SPOT_X_UM, P_SPOT_Y_UM, P_SPOT_RADIUS_UM]
  if (pa > 0) for (const k of lengths) s[pa + k] = s[pa + k]! * factor
  return s
}
