// Named reference scenarios for the bench (and the profile script).
import type { ScenarioInput } from '../shared/types/scenario'
import { REFERENCE_GREEN_STACK } from '../shared/types/thin-film'

const stack = {
  emitter: { index: 1.7, angularProfile: 'isotropic' as const, source: { shape: 'extended' as const } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
}

const bk7 = { sellmeier: { B: [1.03961212, 0.231792344, 1.01046945] as [number, number, number], C: [0.00600069867, 0.0200179144, 103.560653] as [number,
  number, number] } }

export const benchScenarios: Record<string, ScenarioInput> = {
  // The example: close-packed hexagonal hemispheres (target ≥ 600 000 rays/s on one thread).
  'hex-hemisphere-close-packed': { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 } },
  // The same film with polarisation-tracked Fresnel (compare with the line above: same run, same machine).
  'hex-hemisphere-close-packed-polarized': { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 }, trace: { fresnel: 'polarized' } },
  // Polarised and spectral: Gaussian 530/60 nm, N-BK7 substrate and lens (Sellmeier, maker's datasheet).
  'hex-hemisphere-close-packed-polarized-spectral': {
    ...stack,
    emitter: { ...stack.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } },
    substrate: { ...stack.substrate, index: bk7 },
    lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: bk7 },
    trace: { fresnel: 'polarized' },
  },
  // The OLED stack as the source under the same film (its flat companion is exact: no companion rays are traced,
  // so compare device rays with the device-only figures printed at the end, not with the lines above).
  'hex-hemisphere-thin-film-polarized': {
    emitter: { thinFilm: REFERENCE_GREEN_STACK, source: { shape: 'extended' } }, substrate: stack.substrate,
    lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 }, trace: { fresnel: 'polarized' },
  },
  'hex-hemisphere-thin-film': {
    emitter: { thinFilm: REFERENCE_GREEN_STACK, source: { shape: 'extended' } }, substrate: stack.substrate,
    lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  },
  'planar': { ...stack, lensArray: null },
  'planar-polarized': { ...stack, lensArray: null, trace: { fresnel: 'polarized' } },
  'square-parabolic-absorbing': {
    ...stack,
    substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0.5 },
    lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic' },
  },
  'hex-sparse-diffuse-disc': {
    emitter: { index: 1.8, angularProfile: 'lambertian', source: { shape: 'disc', radiusUm: 30 } },
    reflector: { reflectance: 0.9, diffuseFraction: 0.3 },
    substrate: { index: 1.5, thicknessUm: 50, absorptionPerMm: 0 },
    lensArray: { lattice: 'hexagonal', pitchUm: 30, diameterUm: 20, sagUm: 4, shape: 'spherical', index: 1.6 },
  },
}
