// The readable model (shared/optics/steps.ts, run by traceRangeModel) and the fused loop (traceRange) must give
// bit-identical tallies — every slot, the θ–φ map included — on scenarios covering every emitter profile, cap
// shape, Fresnel mode and source shape (plus absorption, a diffuse reflector, a lens index of its own, a square
// lattice and an event limit that bites). A physics change made in one and not the other fails here.
import { describe, expect, it, vi } from 'vitest'
import {
  COLOUR_BINS, COLOUR_LAUNCH_ROW, createTally, packScene, panelBlockOf, PT_EDGE, PT_SPOT, S_PANEL_OFFSET, S_SPECTRAL_OFFSET,
  traceRange, traceRangeModel, T_COLOUR, T_EXTRACTED, T_MAP, T_RAYS, T_UNRESOLVED,
  THETA_BINS, PHI_BINS,
} from '../../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../../shared/types/scenario'
import { REFERENCE_GREEN_STACK } from '../../../shared/types/thin-film'

const stack = {
  emitter: { index: 1.7, angularProfile: 'isotropic' as const, source: { shape: 'extended' as const } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
}
const hemi = { lattice: 'hexagonal' as const, pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' as const }
const sampledSphere = (a: number, h: number): Array<[number, number]> => {
  const Rc = (a * a + h * h) / (2 * h)
  return Array.from({ length: 41 }, (_, i) => [(a * i) / 40, Math.max(0, Math.sqrt(Rc * Rc - ((a * i) / 40) ** 2) - (Rc - h))] as [number, number])
}
const bk7 = { sellmeier: { B: [1.03961212, 0.231792344, 1.01046945] as [number, number, number], C: [0.00600069867, 0.0200179144, 103.560653] as [number,
  number, number] } }
const table = { table: [[0, 1], [30, 0.9], [60, 0.5], [89, 0.05], [90, 0]] as Array<[number, number]> }

/** The OLED stack as the source (no reflector: the stack reflects). */
const oled = {
  emitter: { thinFilm: REFERENCE_GREEN_STACK, source: { shape: 'extended' as const } },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
}

const cases: Record<string, ScenarioInput> = {
  'thin-film source, planar, averaged': { ...oled, lensArray: null },
  'thin-film source, planar, polarized, absorbing glass': { ...oled, substrate: { ...oled.substrate, absorptionPerMm: 1 }, trace: { fresnel: 'polarized' }, lensArray: null },
  'thin-film source, hex hemispheres, polarized': { ...oled, trace: { fresnel: 'polarized' }, lensArray: hemi },
  'thin-film source, square parabolic, no Fresnel, rectangle pixel': { ...oled, emitter: { ...oled.emitter, source: { shape: 'rectangle', widthUm: 30, heightUm: 20 } }, trace: { fresnel: 'none' }, lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic' } },
  'thin-film source, Gaussian spectrum, BK7 glass, lens 1.6, polarized': { ...oled, emitter: { ...oled.emitter, spectrum: { peakNm: 530, fwhmNm: 40 } }, substrate: { ...oled.substrate, index: bk7 }, trace: { fresnel: 'polarized' }, lensArray: { ...hemi, index: 1.6 } },
  'thin-film source, table spectrum, averaged, hex measured cap': { ...oled, emitter: { ...oled.emitter, spectrum: { table: [[470, 0.2], [520, 1], [560, 0.6], [600, 0.1]] } }, lensArray: { ...hemi, sagUm: 3, shape: 'measured', profile: sampledSphere(5, 3) } },
  'planar, isotropic, specular mirror (trapped)': { ...stack, lensArray: null },
  'planar, Lambertian, diffuse mirror, absorbing': { ...stack, emitter: { ...stack.emitter, angularProfile: 'lambertian' }, reflector: { reflectance: 0.9, diffuseFraction: 0.5 }, substrate: { ...stack.substrate, absorptionPerMm: 2 }, lensArray: null },
  'planar, table profile, disc pixel, no Fresnel': { ...stack, emitter: { index: 1.8, angularProfile: table, source: { shape: 'disc', radiusUm: 20 } }, trace: { fresnel: 'none' }, lensArray: null },
  'hex hemispheres, isotropic': { ...stack, lensArray: hemi },
  'hex hemispheres, no Fresnel': { ...stack, trace: { fresnel: 'none' }, lensArray: hemi },
  'hex hemispheres, Lambertian, rectangle pixel': { ...stack, emitter: { index: 1.7, angularProfile: 'lambertian', source: { shape: 'rectangle', widthUm: 30, heightUm: 20 } }, lensArray: hemi },
  'hex hemispheres, table profile': { ...stack, emitter: { ...stack.emitter, angularProfile: table }, lensArray: hemi },
  'square parabolic, absorbing': { ...stack, substrate: { ...stack.substrate, absorptionPerMm: 0.5 }, lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic' } },
  'hex conic k = −0.5, lens index 1.6': { ...stack, lensArray: { lattice: 'hexagonal', pitchUm: 12, diameterUm: 11, sagUm: 4, shape: 'conic', conicConstant: -0.5, index: 1.6 } },
  'square hyperboloid k = −2, lens index 1.4, no Fresnel': { ...stack, trace: { fresnel: 'none' }, lensArray: { lattice: 'square', pitchUm: 10, diameterUm: 9, sagUm: 3, shape: 'conic', conicConstant: -2, index: 1.4 } },
  'hex oblate conic k = 1, disc pixel': { ...stack, emitter: { ...stack.emitter, source: { shape: 'disc', radiusUm: 15 } }, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 2, shape: 'conic', conicConstant: 1 } },
  'hex measured cap': { ...stack, lensArray: { ...hemi, sagUm: 3, shape: 'measured', profile: sampledSphere(5, 3) } },
  'square measured cap, Lambertian, no Fresnel, lens 1.6': { ...stack, emitter: { ...stack.emitter, angularProfile: 'lambertian' }, trace: { fresnel: 'none' }, lensArray: { lattice: 'square', pitchUm: 10, diameterUm: 8, sagUm: 2, shape: 'measured', profile: sampledSphere(4, 2), index: 1.6 } },
  'hex measured cap, table profile, rectangle pixel': { ...stack, emitter: { index: 1.7, angularProfile: table, source: { shape: 'rectangle', widthUm: 25, heightUm: 25 } }, lensArray: { ...hemi, sagUm: 3, shape: 'measured', profile: sampledSphere(5, 3) } },
  'sparse hex, diffuse reflector, disc pixel': { emitter: { index: 1.8, angularProfile: 'lambertian', source: { shape: 'disc', radiusUm: 30 } }, reflector: { reflectance: 0.9, diffuseFraction: 0.3 }, substrate: { index: 1.5, thicknessUm: 50, absorptionPerMm: 0 }, lensArray: { lattice: 'hexagonal', pitchUm: 30, diameterUm: 20, sagUm: 4, shape: 'spherical', index: 1.6 } },
  'emitter index below the substrate (TIR from the substrate side)': { ...stack, emitter: { ...stack.emitter, index: 1.4 }, substrate: { index: 1.6, thicknessUm: 40, absorptionPerMm: 1 }, lensArray: { ...hemi, shape: 'parabolic' } },
  'event limit of 6 (unresolved rays)': { ...stack, trace: { maxEvents: 6 }, lensArray: hemi },
  'planar, polarized, specular mirror, absorbing': { ...stack, substrate: { ...stack.substrate, absorptionPerMm: 1 }, trace: { fresnel: 'polarized' }, lensArray: null },
  'planar, polarized, Lambertian, diffuse mirror': { ...stack, emitter: { ...stack.emitter, angularProfile: 'lambertian' }, reflector: { reflectance: 0.9, diffuseFraction: 0.5 }, trace: { fresnel: 'polarized' }, lensArray: null },
  'hex hemispheres, polarized, n 2.0, R 0.95': { emitter: { index: 2.0, angularProfile: 'isotropic', source: { shape: 'extended' } }, reflector: { reflectance: 0.95, diffuseFraction: 0 }, substrate: { index: 2.0, thicknessUm: 100, absorptionPerMm: 0 }, trace: { fresnel: 'polarized' }, lensArray: { ...hemi, index: 2.0 } },
  'square hyperboloid, lens 1.6, polarized, disc pixel, diffuse': { ...stack, emitter: { ...stack.emitter, source: { shape: 'disc', radiusUm: 20 } }, reflector: { reflectance: 0.9, diffuseFraction: 0.3 }, trace: { fresnel: 'polarized' }, lensArray: { lattice: 'square', pitchUm: 10, diameterUm: 9, sagUm: 3, shape: 'conic', conicConstant: -2, index: 1.6 } },
  'hex measured cap, polarized, emitter below a denser substrate': { ...stack, emitter: { ...stack.emitter, index: 1.4 }, substrate: { index: 1.6, thicknessUm: 40, absorptionPerMm: 0 }, trace: { fresnel: 'polarized' }, lensArray: { ...hemi, sagUm: 3, shape: 'measured', profile: sampledSphere(5, 3), index: 1.5 } },
  'hex hemispheres, Gaussian spectrum, Sellmeier (BK7) substrate and lens, polarized': { ...stack, emitter: { ...stack.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } }, substrate: { ...stack.substrate, index: bk7 }, trace: { fresnel: 'polarized' }, lensArray: hemi },
  'square parabolic, table spectrum, tabulated n,k lens, Cauchy emitter, absorbing': { ...stack, emitter: { ...stack.emitter, index: { cauchy: { A: 1.68, B: 0.01 } }, spectrum: { table: [[420, 0.2], [460, 1], [520, 0.3], [560, 0.8], [640, 0.1]] } }, substrate: { ...stack.substrate, absorptionPerMm: 0.5 }, lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic', index: { table: [[400, 1.62, 0.00002], [700, 1.58, 0.00001]] } } },
  'planar, line spectrum 610 nm, Sellmeier substrate, diffuse': { ...stack, emitter: { ...stack.emitter, spectrum: { wavelengthNm: 610 } }, reflector: { reflectance: 0.9, diffuseFraction: 0.4 }, substrate: { ...stack.substrate, index: bk7 }, lensArray: null },
  'hex hemispheres, Cauchy lens with strong B, broad Gaussian, averaged, disc pixel': { ...stack, emitter: { ...stack.emitter, source: { shape: 'disc', radiusUm: 20 }, spectrum: { peakNm: 560, fwhmNm: 150 } }, lensArray: { ...hemi, index: { cauchy: { A: 1.5, B: 0.03 } } } },
  'planar, Gaussian reaching past 780 nm, Lambertian, no Fresnel': { ...stack, emitter: { ...stack.emitter, angularProfile: 'lambertian', spectrum: { peakNm: 700, fwhmNm: 80 } }, trace: { fresnel: 'none' }, lensArray: null },
  'equal indices everywhere, ideal mirror': { emitter: { index: 1.5, angularProfile: 'isotropic', source: { shape: 'extended' } }, reflector: { reflectance: 1, diffuseFraction: 0 }, substrate: { index: 1.5, thicknessUm: 20, absorptionPerMm: 0 }, lensArray: { lattice: 'square', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' } },
  // finite panels (shared/optics/panel.ts): every edge kind, every detector, each Fresnel mode, lenses or none
  'panel 2 × 1.5 mm, planar, absorbing edges, absorbing glass, sphere': { ...stack, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 0.1 }, lensArray: null, panel: { widthMm: 2, heightMm: 1.5, edges: 'absorbing' } },
  'panel 2 mm, planar, mirrored edges, polarized, specular (trapped)': { ...stack, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 0.2 }, trace: { fresnel: 'polarized' }, lensArray: null, panel: { widthMm: 2, heightMm: 2, edges: 'mirrored' } },
  'panel 3 × 2 mm, planar, ground edges, diffuse mirror, goniometer spot': { ...stack, reflector: { reflectance: 0.9, diffuseFraction: 0.4 }, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 0 }, lensArray: null, panel: { widthMm: 3, heightMm: 2, emitting: { widthMm: 2, heightMm: 1 }, edges: 'ground', detector: { kind: 'goniometer', spotCentreMm: [0.2, 0], spotDiameterMm: 1 } } },
  'panel 2 mm, hex hemispheres, polished edges, luminance meter': { ...stack, substrate: { index: 1.5, thicknessUm: 500, absorptionPerMm: 0 }, lensArray: hemi, panel: { widthMm: 2, heightMm: 2, emitting: { widthMm: 1, heightMm: 1 }, edges: 'polished', detector: { kind: 'luminanceMeter', spotCentreMm: [0, 0], spotDiameterMm: 0.8, acceptanceDeg: 10 } } },
  'panel 0.6 mm, hex hemispheres, polished edges, polarized, sphere with edges': { ...stack, substrate: { index: 1.5, thicknessUm: 300, absorptionPerMm: 0 }, trace: { fresnel: 'polarized' }, lensArray: hemi, panel: { widthMm: 0.6, heightMm: 0.6, edges: 'polished', detector: { kind: 'sphere', includeEdges: true } } },
  'panel 1 mm, square parabolic, ground edges, polarized, Gaussian spectrum': { ...stack, emitter: { ...stack.emitter, spectrum: { peakNm: 530, fwhmNm: 40 } }, substrate: { index: bk7, thicknessUm: 400, absorptionPerMm: 0 }, trace: { fresnel: 'polarized' }, lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic' }, panel: { widthMm: 1, heightMm: 1, edges: 'ground' } },
  'panel 1 mm, planar, polished edges, no Fresnel, mirrored-free diffuse mirror': { ...stack, reflector: { reflectance: 0.95, diffuseFraction: 0.2 }, substrate: { index: 1.5, thicknessUm: 300, absorptionPerMm: 0 }, trace: { fresnel: 'none' }, lensArray: null, panel: { widthMm: 1, heightMm: 1.2, edges: 'polished' } },
  'panel 1.5 mm, hex measured cap, mirrored edges, polarized, goniometer': { ...stack, substrate: { index: 1.5, thicknessUm: 400, absorptionPerMm: 0.5 }, trace: { fresnel: 'polarized' }, lensArray: { ...hemi, sagUm: 3, shape: 'measured', profile: sampledSphere(5, 3) }, panel: { widthMm: 1.5, heightMm: 1.5, edges: 'mirrored', detector: { kind: 'goniometer', spotCentreMm: [0, 0.3], spotDiameterMm: 0.5 } } },
}

// the spectral thin-film cases tabulate their stack over ~50 wavelength nodes first (~0.5 s quiet, more when the
// machine is shared)
vi.setConfig({ testTimeout: 60_000 })

function firstDifference(a: Float64Array, b: Float64Array): string {
  if (a.length !== b.length) return `lengths: fused ${a.length}, model ${b.length}`
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return `slot ${i}: fused ${a[i]}, model ${b[i]}`
  return 'none'
}

describe('readable model = fused loop, bit for bit (seeds 41 and 42, streams 0 and 1, 2500 rays from ray 1000)', () => {
  it('covers at least 16 scenarios', () => expect(Object.keys(cases).length).toBeGreaterThanOrEqual(16))
  for (const [name, input] of Object.entries(cases)) {
    it(name, () => {
      const sc = scenarioSchema.parse(input)
      const scene = packScene(sc)
      // a scene with a spectrum fills the colour block too (every slot of it compared)
      const colour = scene[S_SPECTRAL_OFFSET]! > 0
      const panel = scene[S_PANEL_OFFSET]! > 0
      for (const [seed, stream] of [[41, 0], [42, 1]] as const) {
        const fused = createTally(colour, panel), model = createTally(colour, panel)
        traceRange(scene, 1000, 2500, seed, fused, undefined, stream)
        traceRangeModel(scene, 1000, 2500, seed, model, stream)
        expect(firstDifference(fused, model)).toBe('none')
        expect(fused[T_RAYS]).toBe(2500)
        if (colour) {
          // every ray in the launched row, every extracted one in a band row
          let launched = 0, banded = 0
          for (let j = 0; j < COLOUR_BINS; j++) launched += fused[T_COLOUR + COLOUR_LAUNCH_ROW * COLOUR_BINS + j]!
          for (let i = 0; i < (THETA_BINS / 2) * COLOUR_BINS; i++) banded += fused[T_COLOUR + i]!
          expect(launched).toBe(2500)
          expect(banded).toBe(fused[T_EXTRACTED])
        }
        // not a trivial tally: light got out and the map holds it
        expect(fused[T_EXTRACTED]!).toBeGreaterThan(50)
        let mapped = 0
        for (let i = 0; i < THETA_BINS * PHI_BINS; i++) mapped += fused[T_MAP + i]!
        expect(mapped).toBe(fused[T_EXTRACTED])
        if (panel) {
          // the panel cases do meet their edges, and the spot sees part of the light (not none)
          const pb = panelBlockOf(fused)
          if (!name.includes('mirrored') && !name.includes('ground')) expect(fused[pb + PT_EDGE]!).toBeGreaterThan(20)
          expect(fused[pb + PT_SPOT]!).toBeGreaterThan(20)
        }
      }
    })
  }
  it('a batch event budget that runs out mid-range cuts the same rays short in both (budget 9000 encounters)', () => {
    const scene = packScene(scenarioSchema.parse(cases['hex hemispheres, isotropic']!))
    const fused = createTally(), model = createTally()
    traceRange(scene, 0, 2500, 7, fused, undefined, 0, 9000)
    traceRangeModel(scene, 0, 2500, 7, model, 0, undefined, 9000)
    expect(firstDifference(fused, model)).toBe('none')
    // about 7.5 encounters a ray: 9000 is spent after ~1200 rays, every later ray ends unresolved
    expect(fused[T_UNRESOLVED]!).toBeGreaterThan(1000)
  })
  it('the event limit case does end rays as unresolved', () => {
    const scene = packScene(scenarioSchema.parse(cases['event limit of 6 (unresolved rays)']!))
    const t = createTally()
    traceRangeModel(scene, 0, 2000, 5, t)
    expect(t[T_UNRESOLVED]!).toBeGreaterThan(100)
  })
})
