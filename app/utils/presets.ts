// Starting points for a new design. Invented round values (no published device): a bottom-emitting stack of
// emitter index 1.7 on 100 µm glass of 1.5 with an 80 % back reflector, and four lens choices. New designs trace polarisation-tracked Fresnel.
import type { ScenarioInput } from '#shared/types/scenario'

const stack = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  trace: { rays: 1_000_000, seed: 1, fresnel: 'polarized', maxEvents: 10_000 },
} satisfies Omit<ScenarioInput, 'lensArray'>

export interface DesignPreset { id: string; name: string; hint: string; scenario: ScenarioInput }

export const DESIGN_PRESETS: readonly DesignPreset[] = [
  { id: 'flat', name: 'Flat device', hint: 'No film: the reference every gain is measured against.', scenario: { ...stack, lensArray: null } },
  {
    id: 'dome',
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
    name: 'Close-packed hemispheres',
    hint: 'Touching 10 µm hemispheres on a hexagonal lattice (fill factor 0.907).',
    scenario: { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' } },
  },
  {
    id: 'shallow',
    name: 'Shallow caps',
    hint: '10 µm caps with 1.5 µm sag: easy to mould, smaller gain.',
    scenario: { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 1.5, shape: 'spherical' } },
  },
]
