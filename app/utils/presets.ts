// Starting points for a new design. Invented round values (no published device): a bottom-emitting stack of
// emitter index 1.7 on 100 µm glass of 1.5 with an 80 % back reflector, and four lens choices. New designs trace polarisation-tracked Fresnel.
// Two more presets replace the sheet emitter and its mirror by the OLED's own layer stack (`emitter.thinFilm`).
import { scenarioSchema, type Scenario, type ScenarioInput } from '#shared/types/scenario'
import { REFERENCE_GREEN_STACK, type ThinFilmInput } from '#shared/types/thin-film'
import { applyStack, stackFromInput, type StackValue } from './thinFilmForm'

const stack = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  trace: { rays: 1_000_000, seed: 1, fresnel: 'polarized', maxEvents: 10_000 },
} satisfies Omit<ScenarioInput, 'lensArray'>

/**
 * A blue bottom-emitting fluorescent stack: invented example values of the usual kind (no published device).
 * Glass | ITO 120 nm | HTL 50 nm | EML 25 nm (n 1.8, emitter 12 nm in) | ETL 40 nm | Al-like cathode. The cathode's
 * 0.6 + 5.5i is roughly aluminium in the blue (from memory); q = 0.8 stands for a fluorescent emitter's
 * photoluminescence yield below a phosphorescent one's.
 */
export const BLUE_FLUORESCENT_STACK: ThinFilmInput = {
  layers: [
    { name: 'ITO', thicknessNm: 120, material: { n: 1.95, k: 0.01 } },
    { name: 'HTL', thicknessNm: 50, material: { n: 1.8, k: 0 } },
    { name: 'EML', thicknessNm: 25, material: { n: 1.8, k: 0 }, emitting: true },
    { name: 'ETL', thicknessNm: 40, material: { n: 1.8, k: 0 } },
  ],
  cathode: { material: { n: 0.6, k: 5.5 } },
  emitterPositionNm: 12,
  horizontalDipoleFraction: 2 / 3,
  radiativeEfficiency: 0.8,
}

export interface DesignPreset {
  id: string
  name: string
  hint: string
  /** 'sheet': today's zero-thickness emitter over a mirror; 'stack': the OLED layer stack as the source. */
  source: 'sheet' | 'stack'
  /** The scenario around the source (a stack preset's reflector is dropped when the stack goes in). */
  scenario: ScenarioInput
  stack?: ThinFilmInput
}

const hemispheres = { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' } as const

export const DESIGN_PRESETS: readonly DesignPreset[] = [
  { id: 'flat', source: 'sheet', name: 'Flat device', hint: 'No film: the reference every gain is measured against.', scenario: { ...stack, lensArray: null } },
  {
    id: 'dome',
    source: 'sheet',
    name: 'Isolated dome over a small source',
    hint: 'One 200 µm hemisphere every 400 µm over a 20 µm disc source.',
    scenario: {
      ...stack,
      emitter: { ...stack.emitter, source: { shape: 'disc', radiusUm: 20 } },
      substrate: { ...stack.substrate, thicknessUm: 10 },
      lensArray: { lattice: 'square', pitchUm: 400, diameterUm: 200, sagUm: 100, shape: 'spherical' },
    },
  },
  {
    id: 'hemispheres',
    source: 'sheet',
    name: 'Close-packed hemispheres',
    hint: 'Touching 10 µm hemispheres on a hexagonal lattice (fill factor 0.907).',
    scenario: { ...stack, lensArray: hemispheres },
  },
  {
    id: 'shallow',
    source: 'sheet',
    name: 'Shallow caps',
    hint: '10 µm caps with 1.5 µm sag: easy to mould, smaller gain.',
    scenario: { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 1.5, shape: 'spherical' } },
  },
  {
    id: 'tile-meter',
    source: 'sheet',
    name: 'Lighting tile 50 mm, luminance meter',
    hint: 'Tallowby Luminous Panels\' 50 × 50 mm tile idea: touching hemispheres on 0.7 mm glass with blackened edges, read by a meter on a 20 mm spot.',
    scenario: {
      ...stack,
      substrate: { ...stack.substrate, thicknessUm: 700 },
      lensArray: hemispheres,
      panel: { widthMm: 50, heightMm: 50, edges: 'absorbing', detector: { kind: 'luminanceMeter', spotCentreMm: [0, 0], spotDiameterMm: 20, acceptanceDeg: 5 } },
    },
  },
  {
    id: 'green-stack',
    source: 'stack',
    name: 'Green phosphorescent stack, close-packed hemispheres',
    hint: 'ITO 100 · HTL 40 · EML 20 · ETL 50 nm under an Al-like cathode; the film of touching 10 µm hemispheres.',
    scenario: { ...stack, lensArray: hemispheres },
    stack: REFERENCE_GREEN_STACK,
  },
  {
    id: 'blue-stack',
    source: 'stack',
    name: 'Blue fluorescent stack, close-packed hemispheres',
    hint: 'ITO 120 · HTL 50 · EML 25 · ETL 40 nm, q = 0.8; the film of touching 10 µm hemispheres.',
    scenario: { ...stack, lensArray: hemispheres },
    stack: BLUE_FLUORESCENT_STACK,
  },
]

/**
 * A preset as a design scenario: the sheet part parsed by scenarioSchema (defaults filled in), then for a stack
 * preset the stack in `emitter.thinFilm`, the reflector removed and the emitter index from the emitting layer.
 */
export type PresetScenario = Omit<Scenario, 'reflector' | 'emitter'> & {
  emitter: Scenario['emitter'] & { thinFilm?: StackValue }
  reflector?: Scenario['reflector']
}
export function presetScenario(p: DesignPreset): PresetScenario {
  const s = structuredClone(scenarioSchema.parse(p.scenario)) as PresetScenario
  if (p.stack) applyStack(s, stackFromInput(p.stack))
  return s
}

/**
 * Whether the scenario schema (and so the server) stores a layer stack: it keeps `emitter.thinFilm` and takes a
 * scenario without a reflector. Until it does, the new-design form offers the sheet presets only.
 */
export function scenarioTakesStack(): boolean {
  const green = DESIGN_PRESETS.find((p) => p.id === 'green-stack')!
  const r = scenarioSchema.safeParse(presetScenario(green))
  return r.success && !!(r.data.emitter as { thinFilm?: unknown }).thinFilm
}
