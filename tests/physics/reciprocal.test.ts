// Reciprocal (backward) luminance (shared/optics/reciprocal.ts) against the radiance theorem, the exact flat device
// (quadrature) and the forward binned luminance of the same film.
import { describe, expect, it } from 'vitest'
import { flatCompanion, packScene, reciprocalLuminance, traceScenario } from '../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'

const K = 4
const DEG = Math.PI / 180
const base: ScenarioInput = { emitter: { index: 1.7 }, reflector: { reflectance: 0.8 }, substrate: { index: 1.5, thicknessUm: 100 }, lensArray: null }
const sc = (over: Partial<ScenarioInput>) => scenarioSchema.parse({ ...base, ...over })
const lamb = (a: number, b: number) => Math.sin(b * DEG) ** 2 - Math.sin(a * DEG) ** 2

describe('reciprocal luminance: radiance theorem', () => {
  it('Lambertian, R 0, Fresnel none: L/L_Lambert = 1/n_e² at θ = 0, 15, 30, 45, 60, 75° (Yablonovitch, JOSA 72, 899 (1982), from memory: L/n² invariant) — seed 2201', () => {
    for (const [nE, nS] of [[1.7, 1.7], [1.8, 1.5]] as const) {
      const scene = packScene(sc({ emitter: { index: nE, angularProfile: 'lambertian' }, reflector: { reflectance: 0 }, substrate: { index: nS, thicknessUm: 100 }, trace: { fresnel: 'none' } }))
      for (const th of [0, 15, 30, 45, 60, 75]) {
        const r = reciprocalLuminance(scene, { thetaDeg: th, phiDeg: 0 }, 2000, 2201)
        // every path collects exactly 1/n_e² (σ 0): within σ means equal to rounding
        expect(Math.abs(r.relative - 1 / (nE * nE))).toBeLessThanOrEqual(r.relativeStdErr + 1e-12)
      }
    }
  })
})

describe('reciprocal vs the exact flat device (quadrature), 4σ', () => {
  it.each([
    ['isotropic, averaged Fresnel', 2211, {}],
    ['polarised Fresnel', 2212, { trace: { fresnel: 'polarized' } }],
    ['diffuse reflector 50 %, absorbing substrate 2 /mm', 2213, { reflector: { reflectance: 0.9, diffuseFraction: 0.5 }, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 2 } }],
    ['table profile with down-going emission, 1.5 | 1.7', 2214, { emitter: { index: 1.5, angularProfile: { table: [[0, 1], [60, 0.5], [120, 0.8], [180, 0.2]] } }, substrate: { index: 1.7, thicknessUm: 100 } }],
    ['spectral: Gaussian 530/60 nm, Cauchy emitter, N-BK7 substrate (Sellmeier, maker’s datasheet), polarised', 2215, {
      emitter: { index: { cauchy: { A: 1.68, B: 0.012 } }, spectrum: { peakNm: 530, fwhmNm: 60 } },
      substrate: {
        index: { sellmeier: { B: [1.03961212, 0.231792344, 1.01046945], C: [0.00600069867, 0.0200179144, 103.560653] } },
        thicknessUm: 100, absorptionPerMm: 0.5,
      },
      trace: { fresnel: 'polarized' },
    }],
  ] as const)('%s — seed %s', (_label, seed, over) => {
    const s = sc(over as Partial<ScenarioInput>)
    const q = flatCompanion(s)!
    const scene = packScene(s)
    for (const [a, b] of [[0, 5], [30, 31], [60, 61]] as const) {
      let m = 0
      for (let k = a; k < b; k++) m += q.luminanceRelative[k]! * lamb(k, k + 1)
      const want = m / lamb(a, b)
      const r = reciprocalLuminance(scene, { bandLoDeg: a, bandHiDeg: b }, 30_000, seed)
      const z = (r.relative - want) / r.relativeStdErr
      expect(Math.abs(z), `${a}–${b}°: reciprocal ${r.relative.toFixed(5)} ± ${r.relativeStdErr.toFixed(5)}, quadrature ${want.toFixed(5)}`).toBeLessThanOrEqual(K)
    }
  })
})

describe('reciprocal vs forward binned luminance, 4σ (combined)', () => {
  it.each([
    ['close-packed hexagonal hemispheres', 2221, { lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } }],
    ['square conic (k −0.5), absorbing Lambertian emitter', 2222, {
      emitter: { index: 1.8, angularProfile: 'lambertian' }, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 1 },
      lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'conic', conicConstant: -0.5 },
    }],
    ['planar', 2223, {}],
  ] as const)('%s — seed %s', (_label, seed, over) => {
    const s = sc(over as Partial<ScenarioInput>)
    const fw = traceScenario(s, { rays: 300_000, seed })
    const scene = packScene(s)
    const axis = reciprocalLuminance(scene, { bandLoDeg: 0, bandHiDeg: 5 }, 15_000, seed)
    const zAxis = (axis.relative - fw.luminance.onAxisRelative) / Math.hypot(axis.relativeStdErr, fw.luminance.onAxisRelativeStdErr)
    expect(Math.abs(zAxis), `on axis: reciprocal ${axis.relative.toFixed(4)} ± ${axis.relativeStdErr.toFixed(4)}, binned ${fw.luminance.onAxisRelative.toFixed(4)} ± ${fw.luminance.onAxisRelativeStdErr.toFixed(4)}`).toBeLessThanOrEqual(K)
    // a 5° band at 40–45°: pooled forward bins against the band average
    let c = 0, v = 0
    for (let b = 40; b < 45; b++) { const w = lamb(b, b + 1); c += fw.luminance.relative[b]! * w; v += (fw.luminance.relativeStdErr[b]! * w) ** 2 }
    const fwBand = c / lamb(40, 45), fwBandErr = Math.sqrt(v) / lamb(40, 45)
    const band = reciprocalLuminance(scene, { bandLoDeg: 40, bandHiDeg: 45 }, 15_000, seed, 1)
    const zBand = (band.relative - fwBand) / Math.hypot(band.relativeStdErr, fwBandErr)
    expect(Math.abs(zBand), `40–45°: reciprocal ${band.relative.toFixed(4)} ± ${band.relativeStdErr.toFixed(4)}, binned ${fwBand.toFixed(4)} ± ${fwBandErr.toFixed(4)}`).toBeLessThanOrEqual(K)
    // every path contributes: the reciprocal σ on axis is far below the binned one per path/ray
    expect(axis.relativeStdErr * Math.sqrt(15_000)).toBeLessThan(fw.luminance.onAxisRelativeStdErr * Math.sqrt(300_000))
  })
})
