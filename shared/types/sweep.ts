// Runs and sweeps: the request bodies (one zod schema each, shared by the form, the route and the worker) and the
// expansion of a sweep into cells. A sweep varies one or two numeric fields of a design's scenario over a grid; the
// derived pairs (radius of curvature → sag at fixed diameter, fill factor → diameter at fixed pitch) are resolved
// with the helpers of ./geometry, and a cell whose geometry cannot be built is marked infeasible with the reason
// instead of failing the sweep. Lengths in µm, as everywhere in the scenario.
import { z } from 'zod'
import { runNameSchema } from './run'
import { FIGURE_KEYS } from './figures'
import { MAX_RAYS_PER_CELL, MIN_RAYS_PER_CELL } from './ray-limits'
import { diameterFromFillFactorUm, maxFillFactor, sagFromRadiusUm } from './geometry'
import { scenarioErrorMessages, scenarioSchema, type Scenario } from './scenario'
import { MAX_THIN_FILM_LAYERS } from './thin-film'

/** 0 … MAX_THIN_FILM_LAYERS − 1 as literals, so the 30 layer axes are ordinary keys (no index signature). */
type LayerIndex = 0 | 1 | 2 | 3 | 4 | 5 | 6 | 7 | 8 | 9 | 10 | 11 | 12 | 13 | 14 | 15 | 16 | 17 | 18 | 19 | 20 | 21 | 22 | 23 | 24 | 25 | 26 | 27 | 28 | 29
type LayerThicknessAxis = `emitter.thinFilm.layers[${LayerIndex}].thicknessNm`

/** The OLED stack's layer thicknesses (layers counted from the glass; the path indexes from 0). */
const LAYER_THICKNESS_AXES = Object.fromEntries(Array.from({ length: MAX_THIN_FILM_LAYERS }, (_, i) => [
  `emitter.thinFilm.layers[${i}].thicknessNm`, { label: `Stack layer ${i + 1} thickness`, unit: 'nm' },
])) as Record<LayerThicknessAxis, { label: string; unit: string }>

const NAMED_AXES = {
  'emitter.thinFilm.emitterPositionNm': { label: 'Emitter position in the emitting layer', unit: 'nm' },
  'emitter.thinFilm.horizontalDipoleFraction': { label: 'Horizontal dipole fraction', unit: '' },
  'emitter.index': { label: 'Emitter index', unit: '' },
  'emitter.source.radiusUm': { label: 'Source disc radius', unit: 'µm' },
  'emitter.source.widthUm': { label: 'Pixel width', unit: 'µm' },
  'emitter.source.heightUm': { label: 'Pixel height', unit: 'µm' },
  'reflector.reflectance': { label: 'Back reflectance', unit: '' },
  'reflector.diffuseFraction': { label: 'Diffuse share of reflection', unit: '' },
  'substrate.index': { label: 'Substrate index', unit: '' },
  'substrate.thicknessUm': { label: 'Substrate thickness', unit: 'µm' },
  'substrate.absorptionPerMm': { label: 'Substrate absorption', unit: '1/mm' },
  'lensArray.pitchUm': { label: 'Pitch', unit: 'µm' },
  'lensArray.diameterUm': { label: 'Lens diameter', unit: 'µm' },
  'lensArray.sagUm': { label: 'Sag', unit: 'µm' },
  'lensArray.conicConstant': { label: 'Conic constant', unit: '' },
  'lensArray.index': { label: 'Lens index', unit: '' },
  /** Derived: sets the sag of a spherical cap at the cell's diameter. */
  'lensArray.radiusOfCurvatureUm': { label: 'Radius of curvature', unit: 'µm' },
  /** Derived: sets the diameter at the cell's pitch. */
  'lensArray.fillFactor': { label: 'Fill factor', unit: '' },
  'panel.widthMm': { label: 'Panel width', unit: 'mm' },
  'panel.heightMm': { label: 'Panel height', unit: 'mm' },
} as const

/** Sweepable parameters: a scenario path (or a derived lens quantity), its label and unit for the UI. */
export const AXIS_PARAMETERS = { ...LAYER_THICKNESS_AXES, ...NAMED_AXES } as Record<LayerThicknessAxis, { label: string; unit: string }> & typeof NAMED_AXES

export type AxisParameter = keyof typeof AXIS_PARAMETERS
const axisParameterNames = Object.keys(AXIS_PARAMETERS) as [AxisParameter, ...AxisParameter[]]
/** `layers[3]` in an axis path: the array field and the index. */
const INDEXED = /^(\w+)\[(\d+)\]$/

/** Largest number of values on one axis, and of cells in one sweep. */
export const MAX_AXIS_STEPS = 50
export const MAX_SWEEP_CELLS = 400

export const sweepAxisSchema = z
  .object({
    parameter: z.enum(axisParameterNames),
    values: z.array(z.number().finite()).min(1).max(MAX_AXIS_STEPS).optional(),
    start: z.number().finite().optional(),
    stop: z.number().finite().optional(),
    steps: z.number().int().min(1).max(MAX_AXIS_STEPS).optional(),
  })
  .superRefine((a, ctx) => {
    const hasRange = a.start !== undefined || a.stop !== undefined || a.steps !== undefined
    if (a.values && hasRange) {
      ctx.addIssue({ code: 'custom', path: ['values'], message: 'give either values or start/stop/steps, not both' })
    } else if (!a.values) {
      for (const k of ['start', 'stop', 'steps'] as const) {
        if (a[k] === undefined) ctx.addIssue({ code: 'custom', path: [k], message: 'is required when values are not given' })
      }
      if (a.steps === 1 && a.start !== a.stop) {
        ctx.addIssue({ code: 'custom', path: ['steps'], message: 'must be at least 2 when start and stop differ' })
      }
    }
  })

export type SweepAxis = z.infer<typeof sweepAxisSchema>

/** Figures a sweep can rank its cells by: the registry in ./figures (label, unit, direction, what a design needs). */
export const figureSchema = z.enum(FIGURE_KEYS)

/**
 * How much tracing a run or a cell gets: a fixed ray count, or a target standard error on the extraction that
 * keeps adding batches until it is met or the ray cap is reached.
 */
export const precisionSchema = z
  .object({
    rays: z.number().int().min(MIN_RAYS_PER_CELL).max(MAX_RAYS_PER_CELL).optional(),
    targetStdErr: z.number().positive().max(0.1).optional(),
    rayCap: z.number().int().min(MIN_RAYS_PER_CELL).max(MAX_RAYS_PER_CELL).optional(),
  })
  .superRefine((p, ctx) => {
    if (p.rays !== undefined && p.targetStdErr !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['targetStdErr'], message: 'give either rays or targetStdErr, not both' })
    }
    if (p.targetStdErr !== undefined && p.rayCap === undefined) {
      ctx.addIssue({ code: 'custom', path: ['rayCap'], message: 'is required with targetStdErr (the most rays a cell may use)' })
    }
  })

export const runRequestSchema = z.object({
  designId: z.uuid({ error: 'designId must be the UUID of a saved design' }),
  name: runNameSchema.optional(),
  seed: z.number().int().min(0).max(0xffffffff).optional(),
  precision: precisionSchema.optional(),
})

export const sweepRequestSchema = runRequestSchema.extend({
  axes: z.array(sweepAxisSchema).min(1).max(2),
  figure: figureSchema.default('enhancement'),
})

export type RunRequest = z.infer<typeof runRequestSchema>
export type SweepRequest = z.infer<typeof sweepRequestSchema>

/** The values along an axis: explicit values as given, or `steps` evenly spaced from start to stop inclusive. */
export function axisValues(axis: SweepAxis): number[] {
  if (axis.values) return axis.values.slice()
  const { start, stop, steps } = axis as Required<Pick<SweepAxis, 'start' | 'stop' | 'steps'>>
  if (steps === 1) return [start]
  const out: number[] = []
  for (let i = 0; i < steps; i++) {
    // Written as a blend of both ends so the last value is exactly `stop`.
    out.push(start + ((stop - start) * i) / (steps - 1))
  }
  return out
}

/** One grid point: its index (row-major, first axis slowest), the axis values, and either a scenario or a reason. */
export type SweepCell =
  | { index: number; coordinates: number[]; feasible: true; scenario: Scenario }
  | { index: number; coordinates: number[]; feasible: false; reason: string }

function setPath(target: Record<string, unknown>, path: string[], value: number): boolean {
  let o: Record<string, unknown> = target
  for (let i = 0; i < path.length - 1; i++) {
    const m = INDEXED.exec(path[i]!)
    let next = o[m ? m[1]! : path[i]!]
    if (m) next = Array.isArray(next) ? next[Number(m[2])] : undefined
    if (next === null || typeof next !== 'object') return false
    o = next as Record<string, unknown>
  }
  o[path[path.length - 1]!] = value
  return true
}

function fmt(x: number): string {
  return String(Number(x.toPrecision(4)))
}

/**
 * Checks that every axis applies to the base scenario (a lens axis needs a lens array, a source axis the matching
 * source shape). Returns messages naming the axis; empty when the sweep is well-formed.
 */
export function axisProblems(base: Scenario, axes: SweepAxis[]): string[] {
  const problems: string[] = []
  const seen = new Set<string>()
  axes.forEach((a, i) => {
    if (seen.has(a.parameter)) problems.push(`axes[${i}].parameter ${a.parameter} is already swept by another axis`)
    seen.add(a.parameter)
    if (a.parameter.startsWith('lensArray.') && base.lensArray === null) {
      problems.push(`axes[${i}].parameter ${a.parameter} needs a lens array, but the design is the planar device`)
    }
    if (a.parameter === 'lensArray.radiusOfCurvatureUm' && base.lensArray && base.lensArray.shape !== 'spherical') {
      problems.push(`axes[${i}].parameter lensArray.radiusOfCurvatureUm needs spherical caps, but the design uses ${base.lensArray.shape}`)
    }
    const src = base.emitter.source
    if (a.parameter === 'emitter.source.radiusUm' && src.shape !== 'disc') {
      problems.push(`axes[${i}].parameter emitter.source.radiusUm needs a disc source, but the design's source is ${src.shape}`)
    }
    if ((a.parameter === 'emitter.source.widthUm' || a.parameter === 'emitter.source.heightUm') && src.shape !== 'rectangle') {
      problems.push(`axes[${i}].parameter ${a.parameter} needs a rectangle source, but the design's source is ${src.shape}`)
    }
    if (a.parameter.startsWith('panel.') && base.panel === undefined) {
      problems.push(`axes[${i}].parameter ${a.parameter} needs a finite panel, but the design is the infinite array`)
    }
    const tf = base.emitter.thinFilm
    if (a.parameter.startsWith('emitter.thinFilm.') && tf === undefined) {
      problems.push(`axes[${i}].parameter ${a.parameter} needs an OLED stack (emitter.thinFilm), but the design uses the sheet emitter`)
    }
    const layer = /^emitter\.thinFilm\.layers\[(\d+)\]/.exec(a.parameter)
    if (layer && tf && Number(layer[1]) >= tf.layers.length) {
      problems.push(`axes[${i}].parameter ${a.parameter}: the stack has ${tf.layers.length} layers (layers[0] to layers[${tf.layers.length - 1}])`)
    }
    if (tf && (a.parameter.startsWith('reflector.') || a.parameter === 'emitter.index')) {
      problems.push(`axes[${i}].parameter ${a.parameter} does not apply with an OLED stack: ${a.parameter === 'emitter.index' ? 'the emitter index is the emitting layer\'s' : 'the stack itself reflects'}`)
    }
    if (a.parameter === 'lensArray.conicConstant' && base.lensArray && base.lensArray.shape !== 'conic') {
      problems.push(`axes[${i}].parameter lensArray.conicConstant needs conic caps, but the design uses ${base.lensArray.shape}`)
    }
  })
  const cells = axes.reduce((n, a) => n * axisValues(a).length, 1)
  if (cells > MAX_SWEEP_CELLS) problems.push(`axes give ${cells} cells, max ${MAX_SWEEP_CELLS}`)
  return problems
}

/** Applies one set of axis values to the base scenario; derived quantities after the direct fields. */
export function cellScenario(base: Scenario, axes: SweepAxis[], coordinates: number[]): { ok: true; scenario: Scenario } | { ok: false; reason: string } {
  const s = structuredClone(base) as unknown as Record<string, unknown>
  const derived: Array<[AxisParameter, number]> = []
  axes.forEach((a, i) => {
    const v = coordinates[i]!
    if (a.parameter === 'lensArray.radiusOfCurvatureUm' || a.parameter === 'lensArray.fillFactor') derived.push([a.parameter, v])
    else setPath(s, a.parameter.split('.'), v)
  })
  const lens = s.lensArray as Record<string, number | string> | null
  // Fill factor first: the radius of curvature is then applied to the diameter it gives.
  derived.sort((x, y) => (x[0] === 'lensArray.fillFactor' ? -1 : y[0] === 'lensArray.fillFactor' ? 1 : 0))
  for (const [param, v] of derived) {
    if (!lens) return { ok: false, reason: `${param} needs a lens array` }
    if (param === 'lensArray.fillFactor') {
      const lattice = lens.lattice as 'hexagonal' | 'square'
      const max = maxFillFactor(lattice)
      if (!(v > 0)) return { ok: false, reason: `fill factor must be above 0: got ${fmt(v)}` }
      if (v > max + 1e-12) return { ok: false, reason: `fill factor ${fmt(v)} is above the ${lattice} maximum ${fmt(max)} (touching caps)` }
      // Clamp round-off at the touching limit so D never exceeds the pitch by a last-digit error.
      lens.diameterUm = Math.min(diameterFromFillFactorUm(lattice, v, lens.pitchUm as number), lens.pitchUm as number)
    } else {
      const d = lens.diameterUm as number
      if (!(v >= d / 2)) return { ok: false, reason: `radius of curvature ${fmt(v)} µm is below half the diameter (${fmt(d / 2)} µm): no spherical cap fits` }
      lens.sagUm = sagFromRadiusUm(d, v)
    }
  }
  const parsed = scenarioSchema.safeParse(s)
  if (!parsed.success) return { ok: false, reason: scenarioErrorMessages(parsed.error, s).join('; ') }
  return { ok: true, scenario: parsed.data }
}

/** Expands a sweep into its cells (row-major, first axis slowest). */
export function expandSweep(base: Scenario, axes: SweepAxis[]): SweepCell[] {
  const values = axes.map(axisValues)
  const total = values.reduce((n, v) => n * v.length, 1)
  const cells: SweepCell[] = []
  for (let index = 0; index < total; index++) {
    const coordinates: number[] = []
    let rest = index
    for (let a = axes.length - 1; a >= 0; a--) {
      const n = values[a]!.length
      coordinates.unshift(values[a]![rest % n]!)
      rest = Math.floor(rest / n)
    }
    const r = cellScenario(base, axes, coordinates)
    cells.push(r.ok ? { index, coordinates, feasible: true, scenario: r.scenario } : { index, coordinates, feasible: false, reason: r.reason })
  }
  return cells
}

/**
 * A cell's seed from the sweep's seed and the cell index (a 32-bit avalanche mix, murmur3's finaliser), so a rerun
 * of the same sweep gives the same numbers and neighbouring cells get unrelated streams.
 */
export function cellSeed(sweepSeed: number, cellIndex: number): number {
  let h = (sweepSeed ^ Math.imul(cellIndex + 1, 0x9e3779b9)) >>> 0
  h = Math.imul(h ^ (h >>> 16), 0x85ebca6b)
  h = Math.imul(h ^ (h >>> 13), 0xc2b2ae35)
  return (h ^ (h >>> 16)) >>> 0
}
