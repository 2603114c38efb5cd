// Colour and photometry over angle out of the tracer (shared/optics/colour.ts): the CIE 1931 table's own
// properties, the equal-energy white, Δu′v′ = 0 for a flat non-dispersive stack, spectral runs with constant indices
// against the monochromatic luminance, a dispersive lens that shifts colour over angle, and the delta-method σ
// against the spread of independent seeds.
import { describe, expect, it } from 'vitest'
import {
  CIE_ROWS, CIE_X, CIE_Y, CIE_Z, cieRowNm, colourOf, COLOUR_LAUNCH_ROW, createTally, KM_LM_PER_W, packScene, rowColour, traceRange,
  traceScenario,
} from '../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import { expectWithinSigma, K_SIGMA } from './helpers'

const sum = (a: Float64Array) => a.reduce((s, v) => s + v, 0)

describe('CIE 1931 2° observer table (values from memory of CIE 015:2018 / Wyszecki & Stiles, Color Science, Table I(3.3.1))', () => {
  it('81 rows, 380–780 nm at 5 nm', () => {
    expect(CIE_ROWS).toBe(81)
    expect(cieRowNm(0)).toBe(380)
    expect(cieRowNm(80)).toBe(780)
  })
  it('equal-energy white at x = y = 1/3 to the table\'s rounding (1e-3; the three sums are each ≈ 21.371, Wyszecki & Stiles)', () => {
    const X = sum(CIE_X), Y = sum(CIE_Y), Z = sum(CIE_Z)
    expect(Math.abs(X / (X + Y + Z) - 1 / 3)).toBeLessThan(1e-3)
    expect(Math.abs(Y / (X + Y + Z) - 1 / 3)).toBeLessThan(1e-3)
    for (const s of [X, Y, Z]) expect(Math.abs(s - 21.371)).toBeLessThan(0.01)
  })
  it('V(555 nm) = ȳ(555) = 1.000, the peak of ȳ (CIE photopic V(λ))', () => {
    const i555 = (555 - 380) / 5
    expect(CIE_Y[i555]).toBe(1)
    let peak = 0
    for (let i = 0; i < CIE_ROWS; i++) if (CIE_Y[i]! > CIE_Y[peak]!) peak = i
    expect(cieRowNm(peak)).toBe(555)
    // monochromatic 555 nm radiation: 683 lm/W (the definition of the lumen, CIE 015:2018)
    expect(KM_LM_PER_W * CIE_Y[i555]!).toBe(683)
  })
})

const flat: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic', spectrum: { peakNm: 560, fwhmNm: 100 } },
  reflector: { reflectance: 0.8 },
  substrate: { index: 1.5, thicknessUm: 100 },
  lensArray: null,
  trace: { fresnel: 'polarized' },
}

describe('colour of the traced light', () => {
  it('equal-energy spectrum over 377.5–782.5 nm: launched and extracted light at x = y = 1/3, efficacy 683·Σȳ/81 lm/W — seed 901', () => {
    // every 5 nm bin gets the same power; index-matched, no Fresnel: the stack does not filter colour
    const sc = scenarioSchema.parse({ ...flat, emitter: { ...flat.emitter, spectrum: { table: [[377.5, 1], [782.5, 1]] } }, substrate: { index: 1.7, thicknessUm: 10 }, reflector: { reflectance: 1 }, trace: { fresnel: 'none' } })
    const r = traceScenario(sc, { rays: 400_000, seed: 901 })
    const t = createTally(true)
    traceRange(packScene(sc), 0, 400_000, 901, t)
    const launched = rowColour(t, COLOUR_LAUNCH_ROW)!
    // x, y of the counts: table rounding (1e-3) plus the counts' noise (σ of x, y by the delta method)
    expect(Math.abs(launched.x - 1 / 3)).toBeLessThan(1e-3 + K_SIGMA * Math.sqrt(launched.varX))
    expect(Math.abs(launched.y - 1 / 3)).toBeLessThan(1e-3 + K_SIGMA * Math.sqrt(launched.varY))
    const c = r.colour!
    const want = (KM_LM_PER_W * sum(CIE_Y)) / 81
    expectWithinSigma('efficacy (lm/W)', c.luminousEfficacyLmPerW, want, Math.hypot(c.luminousEfficacyStdErrLmPerW, 0.1))
    // the equal-energy white in u′v′: u′ = 4/19, v′ = 9/19 (x = y = 1/3)
    expectWithinSigma('u′ at 31°', c.uPrime[15]!, 4 / 19, Math.hypot(c.uPrimeStdErr[15]!, 1e-3))
    expectWithinSigma('v′ at 31°', c.vPrime[15]!, 9 / 19, Math.hypot(c.vPrimeStdErr[15]!, 1e-3))
  })

  it('a flat device with non-dispersive layers has Δu′v′ = 0 within σ in every band up to 60° (Gaussian 560/100 nm, polarized) — seed 902', () => {
    const r = traceScenario(scenarioSchema.parse(flat), { rays: 1_000_000, seed: 902 })
    const c = r.colour!
    expect(r.planarColour).toEqual(c) // a planar device is its own companion
    for (let b = 1; b < 30; b++) {
      // component by component (the norm itself is ≥ 0; near 0 its law is Rayleigh-like)
      expectWithinSigma(`u′ band ${c.bandCentersDeg[b]}°`, c.uPrime[b]!, c.uPrime[0]!, Math.hypot(c.uPrimeStdErr[b]!, c.uPrimeStdErr[0]!))
      expectWithinSigma(`v′ band ${c.bandCentersDeg[b]}°`, c.vPrime[b]!, c.vPrime[0]!, Math.hypot(c.vPrimeStdErr[b]!, c.vPrimeStdErr[0]!))
      expect(c.deltaUv[b]!).toBeLessThanOrEqual(K_SIGMA * Math.hypot(c.uPrimeStdErr[b]!, c.uPrimeStdErr[0]!, c.vPrimeStdErr[b]!, c.vPrimeStdErr[0]!))
    }
    expect(r.photopicOnAxisGain).toBe(1)
  })

  it('spectral with constant indices reproduces the monochromatic luminance within σ (hex hemispheres, photopic = radiometric) — seeds 903, 904', () => {
    const lens: ScenarioInput = { ...flat, emitter: { index: 1.7, angularProfile: 'isotropic' }, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' } }
    const mono = traceScenario(scenarioSchema.parse(lens), { rays: 600_000, seed: 903 })
    const spec = traceScenario(scenarioSchema.parse({ ...lens, emitter: { ...lens.emitter, spectrum: { peakNm: 560, fwhmNm: 100 } } }),
      { rays: 600_000, seed: 904 })
    expect(mono.colour).toBeUndefined()
    const c = spec.colour!
    expectWithinSigma('extraction', spec.extraction, mono.extraction, Math.hypot(spec.extractionStdErr, mono.extractionStdErr))
    expectWithinSigma('photopic on-axis vs monochromatic on-axis luminance', c.photopicOnAxisRelative, mono.luminance.onAxisRelative, Math.hypot(c.photopicOnAxisRelativeStdErr, mono.luminance.onAxisRelativeStdErr))
    // the monochromatic companion's on-axis luminance from its first five 1° bins (the same cone, θ < 5°)
    const w1 = (k: number) => Math.sin(((k + 1) * Math.PI) / 180) ** 2 - Math.sin((k * Math.PI) / 180) ** 2
    const axisLamb = Math.sin((5 * Math.PI) / 180) ** 2
    let pa = 0, pae2 = 0
    for (let k = 0; k < 5; k++) {
      pa += (mono.planar.luminanceRelative[k]! * w1(k)) / axisLamb
      pae2 += ((mono.planar.luminanceRelativeStdErr[k]! * w1(k)) / axisLamb) ** 2
    }
    const monoGain = mono.luminance.onAxisRelative / pa
    const monoGainErr = monoGain * Math.hypot(mono.luminance.onAxisRelativeStdErr / mono.luminance.onAxisRelative, Math.sqrt(pae2) / pa)
    expectWithinSigma('photopic on-axis gain vs monochromatic on-axis gain', spec.photopicOnAxisGain!, monoGain, Math.hypot(spec.photopicOnAxisGainStdErr!, monoGainErr))
    for (const b of [5, 15, 25, 35]) {
      // a 2° band pools two 1° bins of the monochromatic run: their Lambertian-weighted mean
      const w = (k: number) => Math.sin(((k + 1) * Math.PI) / 180) ** 2 - Math.sin((k * Math.PI) / 180) ** 2
      const lo = 2 * b, hi = 2 * b + 1
      const m = (mono.luminance.relative[lo]! * w(lo) + mono.luminance.relative[hi]! * w(hi)) / (w(lo) + w(hi))
      const me = Math.hypot(mono.luminance.relativeStdErr[lo]! * w(lo), mono.luminance.relativeStdErr[hi]! * w(hi)) / (w(lo) + w(hi))
      expectWithinSigma(`photopic luminance at ${c.bandCentersDeg[b]}°`, c.photopicRelative[b]!, m, Math.hypot(c.photopicRelativeStdErr[b]!, me))
    }
  })

  it('a dispersive lens (Cauchy A 1.3, B 0.15 µm²) shifts colour over angle; the same lens at its 550 nm index does not — seeds 905, 906', () => {
    // blue and red lines (450, 650 nm, 5 nm wide): n_lens 2.041 and 1.655; emitter 1.8, substrate 1.5
    const lines = { table: [[445, 0], [447.5, 1], [452.5, 1], [455, 0], [645, 0], [647.5, 1], [652.5, 1], [655, 0]] as Array<[number, number]> }
    const device = (index: ScenarioInput['substrate']['index']): ScenarioInput => ({
      emitter: { index: 1.8, angularProfile: 'isotropic', spectrum: lines },
      reflector: { reflectance: 0.8 },
      substrate: { index: 1.5, thicknessUm: 100 },
      lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index },
    })
    const disp = traceScenario(scenarioSchema.parse(device({ cauchy: { A: 1.3, B: 0.15 } })), { rays: 1_000_000, seed: 905 })
    const flatIndex = traceScenario(scenarioSchema.parse(device(1.3 + 0.15 / 0.55 ** 2)), { rays: 1_000_000, seed: 906 })
    const c = disp.colour!, k = flatIndex.colour!
    const b60 = 29 // band 58–60°
    console.info(`dispersive lens: Δu′v′(59°) = ${c.deltaUv[b60]!.toFixed(4)} ± ${c.deltaUvStdErr[b60]!.toFixed(4)}, max to 60° ${c.maxDeltaUvTo60.toFixed(4)} ± ${c.maxDeltaUvTo60StdErr.toFixed(4)}; constant index: Δu′v′(59°) = ${k.deltaUv[b60]!.toFixed(4)} ± ${k.deltaUvStdErr[b60]!.toFixed(4)}`)
    expect(c.deltaUv[b60]! / c.deltaUvStdErr[b60]!).toBeGreaterThan(K_SIGMA)
    expect(c.maxDeltaUvTo60).toBeGreaterThanOrEqual(c.deltaUv[b60]!)
    expectWithinSigma('constant-index u′(59°) vs on axis', k.uPrime[b60]!, k.uPrime[0]!, Math.hypot(k.uPrimeStdErr[b60]!, k.uPrimeStdErr[0]!))
    expectWithinSigma('constant-index v′(59°) vs on axis', k.vPrime[b60]!, k.vPrime[0]!, Math.hypot(k.vPrimeStdErr[b60]!, k.vPrimeStdErr[0]!))
  })

  it('the delta-method σ agrees with the spread over 16 independent seeds (u′ at 31°, Δu′v′ at 59°, photopic on axis, efficacy) — seeds 1000–1015', () => {
    // s²/σ² of 16 batches follows χ²₁₅/15: its 0.05 % and 99.95 % points are 0.25 and 2.65 (chi-square table, from
    // memory), so the ratio s/σ lies in [0.5, 1.63]
    const sc = scenarioSchema.parse({ ...flat, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: { cauchy: { A: 1.3, B: 0.15 } } } })
    const scene = packScene(sc)
    const pick = [
      (c: NonNullable<ReturnType<typeof colourOf>>) => [c.uPrime[15]!, c.uPrimeStdErr[15]!],
      (c: NonNullable<ReturnType<typeof colourOf>>) => [c.deltaUv[29]!, c.deltaUvStdErr[29]!],
      (c: NonNullable<ReturnType<typeof colourOf>>) => [c.photopicOnAxisRelative, c.photopicOnAxisRelativeStdErr],
      (c: NonNullable<ReturnType<typeof colourOf>>) => [c.luminousEfficacyLmPerW, c.luminousEfficacyStdErrLmPerW],
    ]
    const vals: number[][] = pick.map(() => []), errs: number[][] = pick.map(() => [])
    for (let s = 0; s < 16; s++) {
      const t = createTally(true)
      traceRange(scene, 0, 100_000, 1000 + s, t)
      const c = colourOf(t)!
      pick.forEach((f, i) => { const [v, e] = f(c); vals[i]!.push(v!); errs[i]!.push(e!) })
    }
    pick.forEach((_, i) => {
      const v = vals[i]!, m = v.reduce((a, b) => a + b, 0) / v.length
      const sd = Math.sqrt(v.reduce((a, b) => a + (b - m) ** 2, 0) / (v.length - 1))
      const sigma = errs[i]!.reduce((a, b) => a + b, 0) / v.length
      expect(sd / sigma, `figure ${i}: spread ${sd.toPrecision(3)}, delta-method σ ${sigma.toPrecision(3)}`).toBeGreaterThan(0.5)
      expect(sd / sigma, `figure ${i}: spread ${sd.toPrecision(3)}, delta-method σ ${sigma.toPrecision(3)}`).toBeLessThan(1.63)
    })
  })
})
