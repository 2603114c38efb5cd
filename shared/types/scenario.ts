// The scenario file: one zod schema for the stack a designer wants traced. The same schema validates the
// editor form, the HTTP body, the CLI file and the worker task. Lengths in µm, absorption in 1/mm, angles in
// degrees (this is an edge of the system; the core converts to radians when it packs the scene).
import { z } from 'zod'
import { materialAt, thinFilmSchema, type OpticalMaterial } from './thin-film'

/** Tabulated emitter profile: [thetaDeg, relativeIntensity] rows, radiant intensity per steradian in the emitter. */
const profileTableSchema = z
  .array(
    z.tuple([
      z.number().min(0).max(180),
      z.number().min(0),
    ]),
  )
  .min(2)
  .superRefine((rows, ctx) => {
    for (let i = 1; i < rows.length; i++) {
      if (!(rows[i]![0] > rows[i - 1]![0])) {
        ctx.addIssue({ code: 'custom', path: [i, 0], message: `θ must increase row by row: got ${rows[i]![0]}° after ${rows[i - 1]![0]}°` })
        return
      }
    }
    if (!rows.some((r) => r[1] > 0)) ctx.addIssue({ code: 'custom', message: 'at least one relative intensity must be above 0' })
  })

export const angularProfileSchema = z.union([
  z.literal('isotropic'),
  z.literal('lambertian'),
  z.object({ table: profileTableSchema }),
])

export const sourceSchema = z.discriminatedUnion('shape', [
  z.object({ shape: z.literal('extended') }),
  z.object({ shape: z.literal('disc'), radiusUm: z.number().positive().max(1e6) }),
  z.object({ shape: z.literal('rectangle'), widthUm: z.number().positive().max(1e6), heightUm: z.number().positive().max(1e6) }),
])

/** Increasing-wavelength check of [nm, ...] rows. */
function increasingNm(rows: ReadonlyArray<readonly number[]>, ctx: z.RefinementCtx): boolean {
  for (let i = 1; i < rows.length; i++) {
    if (!(rows[i]![0]! > rows[i - 1]![0]!)) {
      ctx.addIssue({ code: 'custom', path: [i, 0], message: `wavelength (nm) must increase row by row: got ${rows[i]![0]} after ${rows[i - 1]![0]}` })
      return false
    }
  }
  return true
}

const wavelengthNm = z.number().min(200, 'must be a wavelength of at least 200 nm').max(2500, 'must be a wavelength of at most 2500 nm')

/**
 * Emission spectrum (optional; absent: monochromatic 550 nm, no colour outputs): one line, a Gaussian band
 * (peak, full width at half maximum; sampled over peak ± 3 FWHM), or a table [[nm, relative spectral power], ...]
 * (linear between rows, zero outside).
 */
export const spectrumSchema = z.union([
  z.object({ wavelengthNm }).strict(),
  z.object({ peakNm: wavelengthNm, fwhmNm: z.number().positive('must be above 0 nm').max(1000) }).strict(),
  z.object({
    table: z.array(z.tuple([wavelengthNm, z.number().min(0, 'relative power must be at least 0')])).min(2, 'needs at least 2 rows (nm, relative power)').max(5000)
      .superRefine((rows, ctx) => {
        if (!increasingNm(rows, ctx)) return
        if (!rows.some((r) => r[1] > 0)) ctx.addIssue({ code: 'custom', message: 'at least one relative power must be above 0' })
      }),
  }).strict(),
])

/**
 * Refractive index of a material: a constant, a Sellmeier formula n² = 1 + Σ Bᵢλ²/(λ² − Cᵢ) (λ in µm, Cᵢ in µm²),
 * a Cauchy formula n = A + B/λ² + C/λ⁴ (µm², µm⁴), or a table [[nm, n, k], ...] (linear between rows; k adds
 * absorption α = 4πk/λ on top of absorptionPerMm in the substrate and lens).
 */
export const indexSchema = z.union([
  z.number().min(1).max(4),
  z.object({ sellmeier: z.object({ B: z.tuple([z.number(), z.number(), z.number()]), C: z.tuple([z.number().min(0), z.number().min(0),
    z.number().min(0)]) }).strict() }).strict(),
  z.object({ cauchy: z.object({ A: z.number().min(1).max(4), B: z.number().default(0), C: z.number().default(0) }).strict() }).strict(),
  z.object({
    table: z.array(z.tuple([wavelengthNm, z.number().min(1, 'n must be at least 1').max(4, 'n must be at most 4'), z.number().min(0, 'k must be at least 0').max(10)]))
      .min(2, 'needs at least 2 rows (nm, n, k)').max(5000)
      .superRefine((rows, ctx) => { increasingNm(rows, ctx) }),
  }).strict(),
])
export type IndexModel = z.infer<typeof indexSchema>
export type Spectrum = z.infer<typeof spectrumSchema>

/** Wavelength of a scenario without a spectrum (nm). */
export const DEFAULT_WAVELENGTH_NM = 550

/** Refractive index n at `nm` (NaN where a Sellmeier formula has no real index, e.g. at a pole). */
export function indexAt(m: IndexModel, nm: number): number {
  if (typeof m === 'number') return m
  const um = nm / 1000, l2 = um * um
  if ('sellmeier' in m) {
    const { B, C } = m.sellmeier
    const n2 = 1 + (B[0] * l2) / (l2 - C[0]) + (B[1] * l2) / (l2 - C[1]) + (B[2] * l2) / (l2 - C[2])
    return n2 > 0 ? Math.sqrt(n2) : NaN
  }
  if ('cauchy' in m) return m.cauchy.A + m.cauchy.B / l2 + m.cauchy.C / (l2 * l2)
  return tableAt(m.table, nm, 1)
}

/** Extinction coefficient k at `nm` (0 unless the index is a table). */
export function extinctionAt(m: IndexModel, nm: number): number {
  return typeof m === 'object' && 'table' in m ? tableAt(m.table, nm, 2) : 0
}

/** Column `col` of [nm, ...] rows linearly interpolated at `nm` (clamped to the end rows). */
export function tableAt(rows: ReadonlyArray<readonly number[]>, nm: number, col: number): number {
  if (nm <= rows[0]![0]!) return rows[0]![col]!
  const last = rows.length - 1
  if (nm >= rows[last]![0]!) return rows[last]![col]!
  let lo = 0, hi = last
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (rows[mid]![0]! <= nm) lo = mid; else hi = mid }
  const a = rows[lo]!, b = rows[hi]!
  const f = (nm - a[0]!) / (b[0]! - a[0]!)
  return a[col]! + f * (b[col]! - a[col]!)
}

/** The wavelength span [min, max] (nm) a spectrum's rays are drawn from (a line: [λ, λ]). */
export function spectrumRangeNm(sp: Spectrum | undefined): [number, number] {
  if (sp === undefined) return [DEFAULT_WAVELENGTH_NM, DEFAULT_WAVELENGTH_NM]
  if ('wavelengthNm' in sp) return [sp.wavelengthNm, sp.wavelengthNm]
  if ('peakNm' in sp) return [Math.max(1, sp.peakNm - 3 * sp.fwhmNm), sp.peakNm + 3 * sp.fwhmNm]
  return [sp.table[0]![0], sp.table[sp.table.length - 1]![0]]
}

/** Refuses an index that is not a real n in 1–4 over the spectrum's range, or a table that does not cover it. */
function checkIndexOverSpectrum(m: IndexModel | undefined, path: Array<string | number>, range: [number, number], ctx: z.RefinementCtx): void {
  if (m === undefined || typeof m === 'number') return
  if ('table' in m) {
    const t0 = m.table[0]![0], t1 = m.table[m.table.length - 1]![0]
    if (range[0] < t0 || range[1] > t1) {
      ctx.addIssue({ code: 'custom', path, message: `the index table covers ${t0}–${t1} nm but the spectrum spans ${round4(range[0])}–${round4(range[1])} nm` })
    }
    return
  }
  const steps = range[1] > range[0] ? 400 : 0
  for (let i = 0; i <= steps; i++) {
    const nm = steps === 0 ? range[0] : range[0] + ((range[1] - range[0]) * i) / steps
    const n = indexAt(m, nm)
    if (!(n >= 1 && n <= 4)) {
      const form = 'sellmeier' in m ? 'Sellmeier' : 'Cauchy'
      ctx.addIssue({ code: 'custom', path, message: `the ${form} formula gives n = ${Number.isNaN(n) ? 'no real value' : round4(n)} at ${round4(nm)} nm, inside the spectrum's range (n must be 1–4)` })
      return
    }
  }
}

export const emitterSchema = z.object({
  /** Required for the sheet emitter; with a thin-film stack it is taken from the emitting layer (any value given is replaced). */
  index: indexSchema.optional(),
  /**
   * The OLED's own layer stack as the source (shared/types/thin-film.ts): rays start in the glass with the stack's
   * emission, and light coming back down meets the stack's own reflectance. The scenario then has no `reflector`.
   */
  thinFilm: thinFilmSchema.optional(),
  /** Emission spectrum; absent: monochromatic 550 nm (no colour outputs). */
  spectrum: spectrumSchema.optional(),
  angularProfile: angularProfileSchema.default('isotropic'),
  source: sourceSchema.default({ shape: 'extended' }),
})

export const reflectorSchema = z.object({
  reflectance: z.number().min(0).max(1),
  diffuseFraction: z.number().min(0).max(1).default(0),
})

export const substrateSchema = z.object({
  index: indexSchema,
  thicknessUm: z.number().positive().max(1e6),
  absorptionPerMm: z.number().min(0).max(1e4).default(0),
})

export const lensShapeSchema = z.enum(['spherical', 'parabolic', 'conic', 'measured'])

/** Most rows a measured profile may carry inside a scenario (uploads are thinned to this; see data-tables). */
export const MAX_PROFILE_ROWS = 5000

/**
 * A measured cap profile: [[rhoUm, heightUm], ...] from the centre (ρ = 0) outwards, heights above the land and
 * non-increasing. It fixes the shape only: the cap is scaled to diameterUm and sagUm (shared/optics/profile.ts).
 */
const lensProfileSchema = z
  .array(z.tuple([z.number().min(0).max(1e6), z.number().min(0).max(1e6)]))
  .min(3)
  .max(MAX_PROFILE_ROWS)
  .superRefine((rows, ctx) => {
    if (rows[0]![0] !== 0) ctx.addIssue({ code: 'custom', path: [0, 0], message: `must start at the lens centre (ρ = 0): got ρ = ${rows[0]![0]} µm` })
    for (let i = 1; i < rows.length; i++) {
      if (!(rows[i]![0] > rows[i - 1]![0])) {
        ctx.addIssue({ code: 'custom', path: [i, 0], message: `ρ must increase row by row: got ${rows[i]![0]} µm after ${rows[i - 1]![0]} µm` })
        return
      }
      if (rows[i]![1] > rows[i - 1]![1]) {
        ctx.addIssue({ code: 'custom', path: [i, 1], message: `height must not rise towards the rim: got ${rows[i]![1]} µm after ${rows[i - 1]![1]} µm` })
        return
      }
    }
    if (!(rows[0]![1] > rows[rows.length - 1]![1])) ctx.addIssue({ code: 'custom', message: 'the centre must be higher than the rim' })
  })

export const lensArraySchema = z
  .object({
    lattice: z.enum(['hexagonal', 'square']),
    pitchUm: z.number().positive().max(1e6),
    diameterUm: z.number().positive().max(1e6),
    sagUm: z.number().positive().max(1e6),
    shape: lensShapeSchema.default('spherical'),
    /** Conic constant k of the cap profile (required when shape is "conic"; 0 sphere, −1 paraboloid). */
    conicConstant: z.number().min(-1e3).max(1e3).optional(),
    /** Measured cap profile (required when shape is "measured"). */
    profile: lensProfileSchema.optional(),
    /** Lens material index; defaults to the substrate index. */
    index: indexSchema.optional(),
  })
  .superRefine((l, ctx) => {
    if (l.diameterUm > l.pitchUm) {
      ctx.addIssue({ code: 'custom', path: ['diameterUm'], message: `must be at most the pitch p = ${um(l.pitchUm)} (caps may touch, not overlap): got ${um(l.diameterUm)}` })
    }
    const a = l.diameterUm / 2
    if (l.shape === 'spherical' && l.sagUm > a) {
      ctx.addIssue({ code: 'custom', path: ['sagUm'], message: `must be at most D/2 = ${um(a)} for a spherical cap: got ${um(l.sagUm)}` })
    }
    if (l.shape === 'measured' && l.profile === undefined) {
      ctx.addIssue({ code: 'custom', path: ['profile'], message: 'is required for a measured cap: pick an uploaded lens profile' })
    }
    if (l.shape === 'conic') {
      if (l.conicConstant === undefined) {
        ctx.addIssue({ code: 'custom', path: ['conicConstant'], message: 'is required for a conic cap' })
      } else if (l.conicConstant > -1) {
        // The cap must lie on the lower branch of the conic: (1+k)·h² ≤ a² (see shared/types/geometry.ts).
        const maxSag = a / Math.sqrt(1 + l.conicConstant)
        if (l.sagUm > maxSag) {
          ctx.addIssue({ code: 'custom', path: ['sagUm'], message: `must be at most D/2/√(1+k) = ${um(maxSag)} for this conic cap: got ${um(l.sagUm)}` })
        }
      } else if (l.conicConstant < -1) {
        // Finite vertex curvature needs a² + (1+k)h² > 0; keep 0.1 % away from the cone limit.
        const maxSag = 0.999 * a / Math.sqrt(-1 - l.conicConstant)
        if (l.sagUm > maxSag) {
          ctx.addIssue({ code: 'custom', path: ['sagUm'], message: `must be at most 0.999·D/2/√(−1−k) = ${um(maxSag)} for this hyperboloid cap: got ${um(l.sagUm)}` })
        }
      }
    }
  })

/**
 * What happens to light in the glass that reaches a substrate edge: "absorbing" (a blackened or taped edge: absorbed),
 * "mirrored" (a metallised edge: specular), "ground" (a ground edge: re-emitted Lambertian back into the glass),
 * "polished" (bare polished glass into air: Fresnel and TIR decide, transmitted light leaves through the edge).
 */
export const panelEdgeSchema = z.enum(['absorbing', 'mirrored', 'ground', 'polished'])

const spotCentreMm = z.tuple([z.number().min(-1e4).max(1e4), z.number().min(-1e4).max(1e4)]).default([0, 0])

/**
 * What the run measures on a finite panel. "sphere": an integrating sphere collecting all light from the front face
 * (and, with includeEdges, what leaves through polished edges). "goniometer": intensity over angle of the light leaving
 * the front face inside a field stop (a spot: centre, diameter). "luminanceMeter": luminance of a spot within an
 * acceptance half-angle about the panel normal.
 */
export const detectorSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('sphere'), includeEdges: z.boolean().default(false) }).strict(),
  z.object({ kind: z.literal('goniometer'), spotCentreMm, spotDiameterMm: z.number().positive().max(1e4) }).strict(),
  z.object({
    kind: z.literal('luminanceMeter'), spotCentreMm, spotDiameterMm: z.number().positive().max(1e4),
    acceptanceDeg: z.number().positive().max(30),
  }).strict(),
])

const panelMm = z.number().positive().max(2000)

/**
 * A finite panel (absent: the infinite array). Centred on the origin; the emitting area is a centred rectangle
 * (absent: the whole panel). The glass (substrate) ends at the panel's outline in edges of one kind.
 */
export const panelSchema = z.object({
  widthMm: panelMm,
  heightMm: panelMm,
  emitting: z.object({ widthMm: panelMm, heightMm: panelMm }).strict().optional(),
  edges: panelEdgeSchema.default('absorbing'),
  detector: detectorSchema.default({ kind: 'sphere', includeEdges: false }),
}).strict()

export const fresnelModeSchema = z.enum(['averaged', 'none', 'polarized'])

export const traceSchema = z.object({
  rays: z.number().int().min(1).max(1e10).default(1_000_000),
  seed: z.number().int().min(0).max(0xffffffff).default(1),
  /**
   * "averaged": reflect with probability (Rs+Rp)/2 (reference). "polarized": each ray carries its field and reflects
   * with |rs|²|Es|² + |rp|²|Ep|². "none": transmit unless TIR (test extension). The schema default stays
   * "averaged" so stored designs that omit the field keep their results; new designs are created "polarized".
   */
  fresnel: fresnelModeSchema.default('averaged'),
  /**
   * Interface and reflector encounters after which a ray is counted as unresolved. At most 100 000: a ray still
   * bouncing after that many encounters lives in a (nearly) lossless cavity (with 1 % loss per reflector visit, the
   * chance of surviving 50 000 visits is below 10⁻²¹⁸), and each such ray costs milliseconds of a shared thread.
   */
  maxEvents: z.number().int().min(1).max(100_000).default(10_000),
})

export const scenarioSchema = z
  .object({
    emitter: emitterSchema,
    /** The back reflector of the sheet emitter; absent with a thin-film stack (the stack reflects). */
    reflector: reflectorSchema.optional(),
    substrate: substrateSchema,
    lensArray: lensArraySchema.nullable(),
    /** A finite panel with its edges and the detector that measures it; absent: the infinite array. */
    panel: panelSchema.optional(),
    trace: traceSchema.default({ rays: 1_000_000, seed: 1, fresnel: 'averaged', maxEvents: 10_000 }),
  })
  .superRefine((s, ctx) => {
    if (s.emitter.thinFilm !== undefined && s.reflector !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['reflector'], message: 'must be left out with a thin-film stack: the stack reflects with its own coherent reflectance down to the cathode' })
    }
    if (s.emitter.thinFilm !== undefined && typeof s.emitter.angularProfile === 'object') {
      ctx.addIssue({ code: 'custom', path: ['emitter', 'angularProfile'], message: 'cannot be a table with a thin-film stack: the stack\'s own emission into the glass is traced (leave it isotropic)' })
    }
    if (s.emitter.thinFilm === undefined && s.reflector === undefined) {
      ctx.addIssue({ code: 'custom', path: ['reflector'], message: 'is required for the sheet emitter (or describe the OLED stack in emitter.thinFilm)' })
    }
    if (s.emitter.thinFilm === undefined && s.emitter.index === undefined) {
      ctx.addIssue({ code: 'custom', path: ['emitter', 'index'], message: 'is required for the sheet emitter (with a thin-film stack it comes from the emitting layer)' })
    }
    if (s.panel) checkPanel(s.panel, s.emitter.source.shape, ctx)
    if (s.panel && s.emitter.thinFilm !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['panel'], message: 'cannot be combined with a thin-film stack yet: the stack\'s exact flat companion is the infinite one (trace the panel with the sheet emitter)' })
    }
    const range = spectrumRangeNm(s.emitter.spectrum)
    const tf = s.emitter.thinFilm
    if (tf) {
      // n,k tables of the stack must cover the wavelengths traced
      const cover = (m: OpticalMaterial, path: Array<string | number>) => {
        if (!m.table) return
        const t0 = m.table[0]![0], t1 = m.table[m.table.length - 1]![0]
        if (range[0] < t0 || range[1] > t1) ctx.addIssue({ code: 'custom', path: [...path, 'table'], message: `the n,k table covers ${t0}–${t1} nm but the spectrum spans ${round4(range[0])}–${round4(range[1])} nm` })
      }
      tf.layers.forEach((l, i) => cover(l.material, ['emitter', 'thinFilm', 'layers', i, 'material']))
      cover(tf.cathode.material, ['emitter', 'thinFilm', 'cathode', 'material'])
    }
    checkIndexOverSpectrum(s.emitter.index, ['emitter', 'index'], range, ctx)
    checkIndexOverSpectrum(s.substrate.index, ['substrate', 'index'], range, ctx)
    if (s.lensArray) checkIndexOverSpectrum(s.lensArray.index, ['lensArray', 'index'], range, ctx)
  })
  .transform((s) => {
    const tf = s.emitter.thinFilm
    // with a stack the emitter index is the emitting layer's (validated above: exactly one)
    const index: IndexModel = tf ? materialAt(tf.layers.find((l) => l.emitting)!.material, DEFAULT_WAVELENGTH_NM).n : s.emitter.index!
    return {
      ...s,
      emitter: { ...s.emitter, index },
      lensArray: s.lensArray === null ? null : { ...s.lensArray, index: s.lensArray.index ?? s.substrate.index },
    }
  })

function checkPanel(p: z.infer<typeof panelSchema>, sourceShape: string, ctx: z.RefinementCtx): void {
  if (sourceShape !== 'extended') {
    ctx.addIssue({ code: 'custom', path: ['emitter', 'source'], message: 'must be extended on a finite panel: the panel\'s emitting area is the source' })
  }
  if (p.emitting && p.emitting.widthMm > p.widthMm) {
    ctx.addIssue({ code: 'custom', path: ['panel', 'emitting', 'widthMm'], message: `must be at most the panel width ${p.widthMm} mm: got ${p.emitting.widthMm} mm` })
  }
  if (p.emitting && p.emitting.heightMm > p.heightMm) {
    ctx.addIssue({ code: 'custom', path: ['panel', 'emitting', 'heightMm'], message: `must be at most the panel height ${p.heightMm} mm: got ${p.emitting.heightMm} mm` })
  }
  const d = p.detector
  if (d.kind !== 'sphere') {
    const [cx, cy] = d.spotCentreMm
    if (Math.abs(cx) > p.widthMm / 2 || Math.abs(cy) > p.heightMm / 2) {
      ctx.addIssue({ code: 'custom', path: ['panel', 'detector', 'spotCentreMm'], message: `must lie on the panel (|x| ≤ ${p.widthMm / 2} mm, |y| ≤ ${p.heightMm / 2} mm): got (${cx}, ${cy}) mm` })
    }
  }
  if (d.kind === 'sphere' && d.includeEdges && p.edges !== 'polished') {
    ctx.addIssue({ code: 'custom', path: ['panel', 'detector', 'includeEdges'], message: `needs polished edges: no light leaves through ${p.edges} edges` })
  }
}

/** A validated scenario with every default filled in (lensArray.index always set when there is an array). */
export type Scenario = z.infer<typeof scenarioSchema>
/** What a user may write (defaults optional). */
export type ScenarioInput = z.input<typeof scenarioSchema>
export type LensArray = NonNullable<Scenario['lensArray']>
export type AngularProfile = Scenario['emitter']['angularProfile']
export type Source = Scenario['emitter']['source']
export type FresnelMode = z.infer<typeof fresnelModeSchema>
export type Panel = z.infer<typeof panelSchema>
export type Detector = z.infer<typeof detectorSchema>
export type PanelEdge = z.infer<typeof panelEdgeSchema>

function round4(x: number): number {
  return Number(x.toPrecision(4))
}

/** A length as shown to a user: to 0.01 µm (the precision a mastering line can make), 3 significant figures below. */
function um(x: number): string {
  return `${Math.abs(x) >= 0.01 ? Number(x.toFixed(2)) : Number(x.toPrecision(3))} µm`
}

/** The editor's names and units of the scenario fields, so messages use the trade's words, not field paths. */
const FIELD_WORDS: Record<string, [string, string]> = {
  'emitter.index': ['Emitter index', ''],
  'emitter.angularProfile': ['Emission profile', ''],
  'emitter.angularProfile.table': ['Emission profile table', ''],
  'emitter.spectrum': ['Emission spectrum', ''],
  'emitter.spectrum.wavelengthNm': ['Emission wavelength', 'nm'],
  'emitter.spectrum.peakNm': ['Spectrum peak', 'nm'],
  'emitter.spectrum.fwhmNm': ['Spectrum width (FWHM)', 'nm'],
  'emitter.spectrum.table': ['Emission spectrum table', ''],
  'emitter.thinFilm': ['OLED stack', ''],
  'emitter.thinFilm.layers': ['OLED stack layers', ''],
  'emitter.thinFilm.cathode': ['Cathode', ''],
  'emitter.thinFilm.cathode.material': ['Cathode material', ''],
  'emitter.thinFilm.cathode.material.n': ['Cathode n', ''],
  'emitter.thinFilm.cathode.material.k': ['Cathode k', ''],
  'emitter.thinFilm.cathode.material.table': ['Cathode n,k table', ''],
  'emitter.thinFilm.emitterPositionNm': ['Emitter position in the emitting layer', 'nm'],
  'emitter.thinFilm.horizontalDipoleFraction': ['Horizontal dipole fraction', ''],
  'emitter.thinFilm.radiativeEfficiency': ['Radiative efficiency q', ''],
  'emitter.source': ['Source area', ''],
  'emitter.source.shape': ['Source area', ''],
  'emitter.source.radiusUm': ['Source radius', 'µm'],
  'emitter.source.widthUm': ['Pixel width', 'µm'],
  'emitter.source.heightUm': ['Pixel height', 'µm'],
  'reflector': ['Back reflector', ''],
  'reflector.reflectance': ['Back reflectance', ''],
  'reflector.diffuseFraction': ['Diffuse share of reflection', ''],
  'substrate.index': ['Substrate index', ''],
  'substrate.thicknessUm': ['Substrate thickness', 'µm'],
  'substrate.absorptionPerMm': ['Substrate absorption', '1/mm'],
  'lensArray.lattice': ['Lattice', ''],
  'lensArray.pitchUm': ['Pitch', 'µm'],
  'lensArray.diameterUm': ['Base diameter D', 'µm'],
  'lensArray.sagUm': ['Sag h', 'µm'],
  'lensArray.shape': ['Cap profile', ''],
  'lensArray.conicConstant': ['Conic constant k', ''],
  'lensArray.profile': ['Measured profile', ''],
  'lensArray.index': ['Lens index', ''],
  'panel': ['Finite panel', ''],
  'panel.widthMm': ['Panel width', 'mm'],
  'panel.heightMm': ['Panel height', 'mm'],
  'panel.emitting.widthMm': ['Emitting width', 'mm'],
  'panel.emitting.heightMm': ['Emitting height', 'mm'],
  'panel.edges': ['Glass edges', ''],
  'panel.detector': ['Detector', ''],
  'panel.detector.kind': ['Detector', ''],
  'panel.detector.includeEdges': ['Sphere collects the edges', ''],
  'panel.detector.spotCentreMm': ['Spot centre', 'mm'],
  'panel.detector.spotDiameterMm': ['Spot diameter', 'mm'],
  'panel.detector.acceptanceDeg': ['Acceptance half-angle', '°'],
  'trace.rays': ['Rays', ''],
  'trace.seed': ['Seed', ''],
  'trace.fresnel': ['Fresnel mode', ''],
  'trace.maxEvents': ['Event limit per ray', ''],
}

/** Column names of the tables a scenario holds, by the table's field (index tables: wavelength, n, k). */
function tableColumns(key: string): readonly string[] {
  if (key.endsWith('.index') || key.endsWith('.material')) return ['wavelength (nm)', 'n', 'k']
  if (key === 'emitter.spectrum') return ['wavelength (nm)', 'relative power']
  if (key === 'emitter.angularProfile') return ['θ (°)', 'relative intensity']
  if (key === 'lensArray.profile') return ['r (µm)', 'height (µm)']
  return []
}

const PART_WORDS: Record<string, string> = { sellmeier: 'Sellmeier formula', cauchy: 'Cauchy formula' }

/**
 * Field name (and unit) for a path; inside a formula or table the part, row and column, e.g. "Lens index table
 * row 1, k" or "Substrate index Sellmeier formula B".
 */
const LAYER_PART_WORDS: Record<string, [string, string]> = {
  thicknessNm: ['thickness', 'nm'], 'material.n': ['n', ''], 'material.k': ['k', ''], 'material.table': ['n,k table', ''], material: ['material', ''],
  emitting: ['emitting mark', ''], name: ['name', ''],
}

function fieldWords(path: ReadonlyArray<PropertyKey>): [string, string] {
  // a row of the OLED stack: "Stack layer 4 thickness" (layers counted from the glass, 1 first)
  if (path.length >= 4 && path[0] === 'emitter' && path[1] === 'thinFilm' && path[2] === 'layers' && typeof path[3] === 'number') {
    const rest = path.slice(4).map(String).join('.')
    if (path[4] === 'material' && path[5] === 'table' && typeof path[6] === 'number') {
      const col = typeof path[7] === 'number' ? `, ${['wavelength (nm)', 'n', 'k'][path[7]] ?? `column ${path[7] + 1}`}` : ''
      return [`Stack layer ${path[3] + 1} n,k table row ${path[6] + 1}${col}`, '']
    }
    const w = LAYER_PART_WORDS[rest]
    return [`Stack layer ${path[3] + 1}${rest === '' ? '' : ` ${w ? w[0] : rest}`}`, w ? w[1] : '']
  }
  for (let n = path.length; n > 0; n--) {
    const key = path.slice(0, n).map(String).join('.')
    const w = FIELD_WORDS[key]
    if (!w) continue
    if (n === path.length) return w
    const rest = path.slice(n)
    const base = key.endsWith('.table') ? key.slice(0, -'.table'.length) : key
    const cols = tableColumns(base)
    let words = w[0]
    let numbers = 0
    for (const part of rest) {
      if (typeof part === 'number') {
        words += numbers === 0 ? ` row ${part + 1}` : `, ${cols[part] ?? `column ${part + 1}`}`
        numbers++
      } else if (part === 'table') words += ' table'
      else words += ` ${PART_WORDS[String(part)] ?? String(part)}`
    }
    return [words, '']
  }
  return [pathText(path), '']
}

function valueText(v: unknown, unit: string): string {
  if (typeof v === 'number') return Number.isFinite(v) ? `${round4(v)}${unit ? ` ${unit}` : ''}` : 'not a number'
  return JSON.stringify(v)
}

function valueAt(data: unknown, path: ReadonlyArray<PropertyKey>): unknown {
  let v: unknown = data
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined
    v = (v as Record<PropertyKey, unknown>)[k]
  }
  return v
}

function pathText(path: ReadonlyArray<PropertyKey>): string {
  let s = ''
  for (const k of path) s += typeof k === 'number' ? `[${k}]` : s === '' ? String(k) : `.${String(k)}`
  return s === '' ? 'scenario' : s
}

/**
 * Turns a zod error into one message per issue in the trade's words, with the allowed range and the value given,
 * numbers rounded, e.g. "Sag h must be at most D/2 = 5 µm for a spherical cap: got 6 µm". `data` is the raw input
 * (used to quote the offending value). The editor, the HTTP API, the CLI and sweep cells all say the same thing.
 */
export function scenarioErrorMessages(error: z.ZodError, data?: unknown): string[] {
  return error.issues.map((iss) => {
    const [where, unit] = fieldWords(iss.path)
    const u = unit ? ` ${unit}` : ''
    const got = valueAt(data, iss.path)
    const gotText = got === undefined ? '' : `: got ${valueText(got, unit)}`
    // the stack's own bounds carry their reason (thin-film.ts): keep it, with the trade's field name in front
    if ((iss.code === 'too_small' || iss.code === 'too_big') && iss.path[1] === 'thinFilm' && iss.origin !== 'array' && / must /.test(iss.message)) {
      return `${where} ${iss.message.replace(/^.*? must /, 'must ')}${gotText}`
    }
    const rowWord = iss.path[iss.path.length - 1] === 'layers' ? 'layers' : 'rows'
    switch (iss.code) {
      case 'too_small': {
        const min = Number(iss.minimum)
        if (iss.origin === 'array') return `${where} must have at least ${min} ${rowWord}${got === undefined ? '' : `: got ${(got as unknown[]).length}`}`
        return `${where} must be ${iss.inclusive ? 'at least' : 'above'} ${min}${u}${gotText}`
      }
      case 'too_big': {
        const max = Number(iss.maximum)
        if (iss.origin === 'array') return `${where} must have at most ${max} ${rowWord}${Array.isArray(got) ? `: got ${got.length}` : ''}`
        return `${where} must be ${iss.inclusive ? 'at most' : 'below'} ${max}${u}${gotText}`
      }
      case 'invalid_type':
        if (got === undefined) return `${where} is required`
        if (got === null || (typeof got === 'number' && !Number.isFinite(got))) return `${where} is empty or not a number: enter a value${unit ? ` in ${unit}` : ''}`
        return `${where} must be a ${iss.expected}${gotText}`
      case 'invalid_value':
        return `${where} must be one of ${iss.values.map((v) => JSON.stringify(v)).join(', ')}${gotText}`
      case 'invalid_union':
        if (iss.path[iss.path.length - 1] === 'source') return `${where} must be extended, a disc (radius) or a rectangle (width, height)${gotText}`
        if (iss.path[iss.path.length - 1] === 'angularProfile') return `${where} must be isotropic, Lambertian or a table of (θ in °, relative intensity) rows${gotText}`
        return `${where} is not valid: ${iss.message}${gotText}`
      case 'unrecognized_keys':
        return `${where} has unknown field(s): ${iss.keys.join(', ')}`
      case 'custom':
        // "Sag h must be at most …" reads on; a message that is a sentence of its own ("the table covers …") gets a colon
        return `${where}${/^(must|is|has|needs|cannot)\b/.test(iss.message) ? ' ' : ': '}${iss.message}`
      default:
        return `${where}: ${iss.message}${gotText}`
    }
  })
}

/** Parses and validates; returns either the scenario or the field-named messages. */
export function parseScenario(data: unknown): { ok: true; scenario: Scenario } | { ok: false; errors: string[] } {
  const r = scenarioSchema.safeParse(data)
  return r.success ? { ok: true, scenario: r.data } : { ok: false, errors: scenarioErrorMessages(r.error, data) }
}

/** The Fresnel mode a stored (already parsed) scenario was traced with; undefined when it does not say. */
export function fresnelModeOf(scenario: unknown): FresnelMode | undefined {
  const mode = (scenario as { trace?: { fresnel?: unknown } } | null)?.trace?.fresnel
  const parsed = fresnelModeSchema.safeParse(mode)
  return parsed.success ? parsed.data : undefined
}

/** An index as shown to a user: a constant as it is; a formula or table by its kind and its n at 550 nm. */
export function describeIndex(m: IndexModel | undefined): string {
  if (m === undefined) return '—'
  if (typeof m === 'number') return String(m)
  // a design's reference to an uploaded table (shared/types/table-refs.ts): resolved only when a run is created
  if ('tableId' in (m as object)) return 'uploaded n,k table'
  const kind = 'sellmeier' in m ? 'Sellmeier' : 'cauchy' in m ? 'Cauchy' : 'n,k table'
  return `${kind} (${indexAt(m, DEFAULT_WAVELENGTH_NM).toFixed(4)} at ${DEFAULT_WAVELENGTH_NM} nm)`
}
