// The flat companion by quadrature (shared/optics/flat-quadrature.ts) against closed forms and against the traced
// companion (same stack, stream 1, as a run traces it with --companion traced).
import { describe, expect, it } from 'vitest'
import {
  createTally, flatCompanion, flatOutcomes, packScene, STREAM_PLANAR, T_EXTRACTED, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED,
  T_UNRESOLVED, T_WAVEGUIDED, THETA_BINS, traceRange, traceScenario,
} from '../../shared/optics'
import { scenarioSchema, type Scenario, type ScenarioInput } from '../../shared/types/scenario'

/** 4σ two-sided for each scalar figure (normal tail 6.3e-5; Abramowitz & Stegun, §26.2, from memory). */
const K = 4

function flat(over: Partial<ScenarioInput> & { emitter?: ScenarioInput['emitter'] } = {}): Scenario {
  return scenarioSchema.parse({
    emitter: { index: 1.7 }, reflector: { reflectance: 0.8 }, substrate: { index: 1.5, thicknessUm: 100 }, lensArray: null, ...over,
  })
}

const sum = (o: Float64Array) => o.reduce((a, b) => a + b, 0)
const extracted = (o: Float64Array) => sum(o.subarray(0, THETA_BINS))
const LOSS = { reflector: T_REFLECTOR, substrate: T_SUBSTRATE, waveguided: T_WAVEGUIDED, trapped: T_TRAPPED, unresolved: T_UNRESOLVED } as const

describe('flat quadrature: closed forms', () => {
  it('isotropic, R 0, Fresnel none: extraction = (1 − cosθc)/2, θc = asin(1/n_e) (Snell; Hecht, Optics, ch. 4), for 1.5|1.5 and 1.7|1.5', () => {
    for (const [nE, nS] of [[1.5, 1.5], [1.7, 1.5], [1.6, 1.9]] as const) {
      const o = flatOutcomes(packScene(flat({ emitter: { index: nE }, reflector: { reflectance: 0 }, substrate: { index: nS, thicknessUm: 100 }, trace: { fresnel: 'none' } }), { planar: true }))
      expect(Math.abs(extracted(o) - (1 - Math.sqrt(1 - 1 / (nE * nE))) / 2)).toBeLessThan(1e-12)
      expect(Math.abs(sum(o) - 1)).toBeLessThan(1e-12)
    }
  })

  it('isotropic, ideal specular mirror, Fresnel none: 1 − cosθc, which tends to 1/(2n²) (Greenham, Friend & Bradley, Adv. Mater. 6, 491 (1994); from memory)', () => {
    for (const n of [1.5, 1.8, 3.5]) {
      const o = flatOutcomes(packScene(flat({ emitter: { index: n }, reflector: { reflectance: 1 }, substrate: { index: n, thicknessUm: 100 }, trace: { fresnel: 'none' } }), { planar: true }))
      const want = 1 - Math.sqrt(1 - 1 / (n * n))
      expect(Math.abs(extracted(o) - want)).toBeLessThan(1e-12)
      // the 1/(2n²) limit: 2n²(1 − cos θc) = 1 + x/4 + x²/8 + … with x = 1/n², below 1 + x/2 for x ≤ ½
      const x = 1 / (n * n)
      expect(extracted(o) * 2 * n * n - 1).toBeGreaterThan(x / 4)
      expect(extracted(o) * 2 * n * n - 1).toBeLessThan(x / 2)
    }
  })

  it('Lambertian, R 0, Fresnel none: extraction 1/n_e² and L/L_Lambert = 1/n_e² in every 1° bin (radiance n² law; Yablonovitch, JOSA 72, 899 (1982); from memory)', () => {
    for (const [nE, nS] of [[1.7, 1.7], [1.8, 1.5]] as const) {
      const c = flatCompanion(flat({ emitter: { index: nE, angularProfile: 'lambertian' }, reflector: { reflectance: 0 }, substrate: { index: nS, thicknessUm: 100 }, trace: { fresnel: 'none' } }))!
      expect(Math.abs(c.extraction - 1 / (nE * nE))).toBeLessThan(1e-12)
      for (const L of c.luminanceRelative) expect(Math.abs(L - 1 / (nE * nE))).toBeLessThan(1e-10)
    }
  })

  it('Lambertian, ideal diffuse reflector R, no absorption, Fresnel none: η = (1/n²)/(1 − (1 − 1/n²)R) (escape 1/n² per encounter of randomised light: Yablonovitch, JOSA 72, 899 (1982); from memory)', () => {
    for (const R of [0.5, 0.9, 0.99]) {
      const n = 1.6
      const o = flatOutcomes(packScene(flat({ emitter: { index: n, angularProfile: 'lambertian' }, reflector: { reflectance: R, diffuseFraction: 1 }, substrate: { index: n, thicknessUm: 100 }, trace: { fresnel: 'none' } }), { planar: true }))
      const p = 1 / (n * n)
      expect(Math.abs(extracted(o) - p / (1 - (1 - p) * R))).toBeLessThan(1e-12)
      expect(Math.abs(sum(o) - 1)).toBeLessThan(1e-12)
    }
  })

  it('accounts for every launched ray (sum 1 to 1e-12) and the bins add up to the extraction, for each Fresnel mode and reflector', () => {
    for (const fresnel of ['none', 'averaged', 'polarized'] as const) {
      for (const reflector of [{ reflectance: 0.8 }, { reflectance: 0.9, diffuseFraction: 0.4 }]) {
        const sc = flat({ reflector, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 1 }, trace: { fresnel } })
        const o = flatOutcomes(packScene(sc, { planar: true }))
        expect(Math.abs(sum(o) - 1)).toBeLessThan(1e-12)
        const c = flatCompanion(sc)!
        const fromBins = c.perSteradian.reduce((a, v, b) => a + v * 2 * Math.PI * (Math.cos((b * Math.PI) / 180) - Math.cos(((b + 1) * Math.PI) / 180)), 0)
        expect(Math.abs(fromBins - c.extraction)).toBeLessThan(1e-12)
      }
    }
  })

  it('random stacks (seeded; indices 1–4, all profiles, reflectors, absorptions, Fresnel modes, event limits 1–10⁵): every ray accounted for to 1e-9, nothing negative', () => {
    let state = 2150
    const rnd = () => { state = (Math.imul(state, 1664525) + 1013904223) >>> 0; return state / 2 ** 32 }
    const pick = <T,>(a: readonly T[]): T => a[Math.floor(rnd() * a.length)]!
    for (let i = 0; i < 120; i++) {
      const nE = pick([1, 1.0001, 1.5, 1.7, 3.9, 1 + 3 * rnd()]), nS = pick([1, 1.5, 1.7, nE, 1 + 3 * rnd()])
      const s = flat({
        emitter: { index: nE, angularProfile: pick(['isotropic', 'lambertian', { table: [[0, rnd()], [45, rnd()], [90, rnd() + 0.01], [170, rnd()]] }, { table: [[10, 1], [20, 0]] }] as const) },
        reflector: { reflectance: pick([0, 1, rnd()]), diffuseFraction: pick([0, 1, rnd()]) },
        substrate: { index: nS, thicknessUm: pick([0.01, 100, 1e5]), absorptionPerMm: pick([0, 0.1, 100, 1e4]) },
        trace: { fresnel: pick(['none', 'averaged', 'polarized'] as const), maxEvents: pick([1, 2, 3, 10, 10_000, 100_000]) },
      })
      const o = flatOutcomes(packScene(s, { planar: true }))
      expect(Math.abs(sum(o) - 1), JSON.stringify(s)).toBeLessThan(1e-9)
      expect(o.every((v) => v >= -1e-15), JSON.stringify(s)).toBe(true)
    }
  })
})

/** Quadrature vs the traced companion: each scalar within Kσ, the 90 bins by χ² (≤ dof + 5·√(2·dof)). */
function compareTraced(sc: Scenario, rays: number, seed: number): void {
  const scene = packScene(sc, { planar: true })
  const o = flatOutcomes(scene)
  const t = createTally()
  traceRange(scene, 0, rays, seed, t, undefined, STREAM_PLANAR)
  expect(t[T_RAYS]).toBe(rays)
  const check = (label: string, q: number, count: number) => {
    const p = count / rays
    const sigma = Math.sqrt(Math.max(q * (1 - q), 1 / rays) / rays) // σ of the traced fraction under the quadrature value
    const z = (p - q) / sigma
    expect(Math.abs(z), `${label}: traced ${p.toPrecision(6)}, quadrature ${q.toPrecision(6)}, z ${z.toFixed(2)}`).toBeLessThanOrEqual(K)
  }
  check('extraction', extracted(o), t[T_EXTRACTED]!)
  const slots = [THETA_BINS, THETA_BINS + 1, THETA_BINS + 2, THETA_BINS + 3, THETA_BINS + 4]
  Object.entries(LOSS).forEach(([name, slot], i) => check(name, o[slots[i]!]!, t[slot]!))
  let chi2 = 0, dof = 0
  for (let b = 0; b < THETA_BINS; b++) {
    const q = o[b]!
    if (!(q * rays > 5)) { expect(t[T_THETA + b]!).toBeLessThanOrEqual(Math.max(10, 10 * q * rays)); continue }
    chi2 += (t[T_THETA + b]! - q * rays) ** 2 / (q * rays * (1 - q))
    dof++
  }
  expect(dof).toBeGreaterThan(20)
  // χ² with dof degrees of freedom: mean dof, σ √(2 dof) (normal approximation; Abramowitz & Stegun, §26.4, from memory)
  expect(chi2, `I(θ) χ² ${chi2.toFixed(1)} over ${dof} bins`).toBeLessThan(dof + 5 * Math.sqrt(2 * dof))
}

const table: ScenarioInput['emitter']['angularProfile'] = { table: [[0, 1], [30, 0.9], [60, 0.5], [90, 0.3], [120, 0.6], [180, 0.1]] }

describe('flat quadrature vs the traced companion (4σ; I(θ) by χ²)', () => {
  const N = 400_000
  it.each([
    ['isotropic, 1.7 | 1.5, R 0.8, averaged', 2101, flat()],
    ['Lambertian, 1.8 | 1.5, R 0.5', 2102, flat({ emitter: { index: 1.8, angularProfile: 'lambertian' }, reflector: { reflectance: 0.5 } })],
    ['table profile (down-going part too), 1.5 | 1.7, R 0.9', 2103, flat({ emitter: { index: 1.5, angularProfile: table }, reflector: { reflectance: 0.9 }, substrate: { index: 1.7, thicknessUm: 100 } })],
    ['absorbing substrate 3 /mm over 200 µm', 2104, flat({ substrate: { index: 1.5, thicknessUm: 200, absorptionPerMm: 3 } })],
    ['diffuse reflector R 0.95, 60 % diffuse, Lambertian', 2105, flat({ emitter: { index: 1.7, angularProfile: 'lambertian' }, reflector: { reflectance: 0.95, diffuseFraction: 0.6 } })],
    ['polarised Fresnel, isotropic, R 0.9, absorbing 1 /mm', 2106, flat({ reflector: { reflectance: 0.9 }, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 1 }, trace: { fresnel: 'polarized' } })],
    ['polarised, diffuse 30 %, table profile', 2107, flat({ emitter: { index: 1.8, angularProfile: table }, reflector: { reflectance: 0.9, diffuseFraction: 0.3 }, trace: { fresnel: 'polarized' } })],
    ['spectral: Gaussian 530/60 nm, Cauchy emitter, N-BK7 substrate (Sellmeier, maker’s datasheet), polarised', 2108, flat({
      emitter: { index: { cauchy: { A: 1.68, B: 0.012 } }, spectrum: { peakNm: 530, fwhmNm: 60 } },
      substrate: {
        index: { sellmeier: { B: [1.03961212, 0.231792344, 1.01046945], C: [0.00600069867, 0.0200179144, 103.560653] } },
        thicknessUm: 100, absorptionPerMm: 0.5,
      },
      trace: { fresnel: 'polarized' },
    })],
    ['spectral: two-band table spectrum, n,k table substrate (absorption 4πk/λ)', 2109, flat({
      emitter: { index: 1.75, spectrum: { table: [[450, 0], [460, 1], [470, 0], [600, 0], [610, 2], [620, 0]] } },
      substrate: { index: { table: [[400, 1.52, 2e-6], [700, 1.48, 1e-5]] }, thicknessUm: 100 },
    })],
    ['event limit 6 with a diffuse reflector (truncation stepped event by event)', 2110, flat({ reflector: { reflectance: 0.8, diffuseFraction: 0.5 }, trace: { maxEvents: 6 } })],
    ['event limit 3, specular', 2111, flat({ trace: { maxEvents: 3 } })],
  ] as const)('%s — seed %s', (_label, seed, sc) => {
    compareTraced(sc, N, seed)
  })
})

describe('runs with the quadrature companion', () => {
  const lens = { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } as const
  it('the default run computes the companion (method quadrature, σ 0) and takes the enhancement σ from the device alone; traced agrees within 4σ — seed 2120', () => {
    const sc = scenarioSchema.parse({ ...flat(), lensArray: lens, trace: { rays: 60_000, seed: 2120 } })
    const q = traceScenario(sc)
    const t = traceScenario(sc, { companion: 'traced' })
    expect(q.planar.method).toBe('quadrature')
    expect(t.planar.method).toBe('traced')
    expect(q.planar.extractionStdErr).toBe(0)
    expect(q.extraction).toBe(t.extraction) // the device stream is the same
    expect(q.enhancementStdErr / q.enhancement).toBeCloseTo(q.extractionStdErr / q.extraction, 12)
    expect(q.enhancementStdErr).toBeLessThan(t.enhancementStdErr)
    const z = (t.planar.extraction - q.planar.extraction) / t.planar.extractionStdErr
    expect(Math.abs(z)).toBeLessThanOrEqual(K)
  })
  it('a finite pixel keeps the traced companion (its footprint needs exit positions)', () => {
    const sc = scenarioSchema.parse({ ...flat(), emitter: { index: 1.7, source: { shape: 'disc', radiusUm: 20 } }, lensArray: lens, trace: { rays: 5000, seed: 3 } })
    expect(flatCompanion(sc)).toBeNull()
    expect(traceScenario(sc).planar.method).toBe('traced')
  })
})
