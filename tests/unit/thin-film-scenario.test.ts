// The OLED stack in the scenario: emitter.thinFilm replaces the reflector and gives the emitter index; bad stacks
// and conflicts get the trade-worded messages; thicknesses, position and orientation are sweep axes; the packed
// scene carries the source tables, and the exact flat device agrees with the dipole module's own flat outcoupling.
import { describe, expect, it } from 'vitest'
import { createTally, mergeRunTallies, packScene, prepareRun, S_REFLECTANCE, S_THINFILM_OFFSET, summarize, traceChunk, traceScenario, T_STACK_ABSORBED } from '../../shared/optics'
import { prepareStack, stackReflectance, thinFilmAt } from '../../shared/optics/thinfilm'
import { thinFilmFlat } from '../../shared/optics/thinfilm/flat'
import { sampleThinFilmLaunch, stackCoefficients, thinFilmSource, thinFilmWavelengths } from '../../shared/optics/thinfilm/source'
import { parseScenario, scenarioSchema } from '../../shared/types/scenario'
import { axisProblems, cellScenario, sweepRequestSchema } from '../../shared/types/sweep'
import { REFERENCE_GREEN_STACK as REF } from '../../shared/types/thin-film'

const base = { emitter: { thinFilm: REF }, substrate: { index: 1.5, thicknessUm: 700 }, lensArray: null }
const L = REF.layers
const withStack = (tf: object) => ({ ...base, emitter: { thinFilm: { ...REF, ...tf } } })
const errorsOf = (input: unknown): string[] => {
  const r = parseScenario(input)
  return r.ok ? [] : r.errors
}

describe('emitter.thinFilm in the scenario', () => {
  it('takes the emitter index from the emitting layer and has no reflector', () => {
    const sc = scenarioSchema.parse({ ...base, emitter: { index: 1.6, thinFilm: REF } })
    expect(sc.emitter.index).toBe(1.75) // the EML's n, not the 1.6 given
    expect(sc.reflector).toBeUndefined()
    // a stored (parsed) scenario parses again to itself (sweep cells re-parse their scenario)
    expect(scenarioSchema.parse(sc)).toEqual(sc)
  })

  it('refuses a reflector beside a stack, and the sheet emitter without one or without an index', () => {
    expect(errorsOf({ ...base, reflector: { reflectance: 0.8 } })).toEqual(['Back reflector must be left out with a thin-film stack: the stack reflects with its own coherent reflectance down to the cathode'])
    expect(errorsOf({ emitter: { index: 1.7 }, substrate: base.substrate, lensArray: null })[0]).toMatch(/^Back reflector is required for the sheet emitter/)
    expect(errorsOf({ emitter: {}, reflector: { reflectance: 0.8 }, substrate: base.substrate, lensArray: null })[0]).toMatch(/^Emitter index is required for the sheet emitter/)
    expect(errorsOf({ ...base, emitter: { thinFilm: REF, angularProfile: { table: [[0, 1], [90, 0]] } } })).toEqual(['Emission profile cannot be a table with a thin-film stack: the stack\'s own emission into the glass is traced (leave it isotropic)'])
  })

  it('names the field of every bad stack in the trade\'s words', () => {
    expect(errorsOf(withStack({ layers: L.map((l) => ({ ...l, emitting: false })) }))).toEqual(['OLED stack layers: no emitting layer: mark exactly one layer with "emitting": true'])
    expect(errorsOf(withStack({ layers: L.map((l, i) => ({ ...l, emitting: i >= 2 })) }))[0]).toBe('Stack layer 4 emitting mark: 2 emitting layers (layers 3, 4, counted from the glass): mark exactly one layer as emitting')
    expect(errorsOf(withStack({ emitterPositionNm: 30 }))[0]).toMatch(/^Emitter position in the emitting layer: the emitter position 30 nm is outside the emitting layer EML \(thickness 20 nm\)/)
    expect(errorsOf(withStack({ layers: L.map((l, i) => (i === 0 ? { ...l, material: { n: 1.9, k: -0.01 } } : l)) }))).toEqual(['Stack layer 1 k must not be negative (a negative k would be optical gain): got -0.01'])
    expect(errorsOf(withStack({ layers: L.map((l, i) => (i === 3 ? { ...l, thicknessNm: 12000 } : l)) }))).toEqual(['Stack layer 4 thickness must be at most 10000 nm (10 µm): a thicker layer is not a coherent thin film: got 12000 nm'])
    const many = [...Array.from({ length: 28 }, () => ({ thicknessNm: 10, material: { n: 1.8, k: 0 } })), ...L]
    expect(errorsOf(withStack({ layers: many }))).toEqual(['OLED stack layers must have at most 30 layers: got 32'])
    expect(errorsOf(withStack({ cathode: { material: { n: 0.96, k: -1 } } }))).toEqual(['Cathode k must not be negative (a negative k would be optical gain): got -1'])
    expect(errorsOf(withStack({ horizontalDipoleFraction: 1.2 }))).toEqual(['Horizontal dipole fraction must be between 0 and 1: got 1.2'])
  })
})

describe('layer materials as n,k tables', () => {
  const flatTable = (n: number, k: number) => ({ table: [[380, n, k], [780, n, k]] as Array<[number, number, number]> })
  it('a constant table gives the same stack optics as the pair (F, glass share, flat η_air at 550 nm)', () => {
    const tabled = {
      ...REF, layers: L.map((l) => ({ ...l, material: flatTable(l.material.n!, l.material.k ?? 0) })), cathode: { material: flatTable(0.96, 6.69) },
    }
    const a = thinFilmSource(scenarioSchema.parse(base)).nodes[0]!.point
    const sc = scenarioSchema.parse(withStack(tabled))
    expect(sc.emitter.index).toBe(1.75)
    const b = thinFilmSource(sc).nodes[0]!.point
    expect(b.purcell.mixed).toBe(a.purcell.mixed)
    expect(b.airS + b.airP).toBe(a.airS + a.airP)
  })
  it('a dispersive table is read at each wavelength node (linear between rows)', () => {
    const disp = {
      ...REF, layers: L.map((l, i) => (i === 0 ? { ...l, material: { table: [[400, 2.1, 0.02], [700, 1.8, 0.005]] as Array<[number, number, number]> } } : l)),
    }
    const sc = scenarioSchema.parse({ ...withStack(disp), emitter: { thinFilm: disp, spectrum: { peakNm: 550, fwhmNm: 30 } } })
    const nodes = thinFilmSource(sc).nodes
    const at550 = thinFilmAt({ ...REF, layers: L.map((l, i) => (i === 0 ? { ...l, material: { n: 1.95, k: 0.0125 } } : l)) } as never, 550, { glassIndex: 1.5 })
    const n550 = nodes.find((n) => Math.abs(n.wavelengthNm - 550) < 1e-9)!
    expect(n550.point.purcell.mixed).toBeCloseTo(at550.purcell.mixed, 12)
  })
  it('refuses a table that does not cover the spectrum, an absorbing emitting layer, and n beside a table', () => {
    const short = {
      ...REF, layers: L.map((l, i) => (i === 1 ? { ...l, material: { table: [[500, 1.75, 0], [600, 1.75, 0]] as Array<[number, number, number]> } } : l)),
    }
    expect(errorsOf({ ...withStack(short), emitter: { thinFilm: short, spectrum: { peakNm: 520, fwhmNm: 40 } } })).toEqual(['Stack layer 2 n,k table: the n,k table covers 500–600 nm but the spectrum spans 400–640 nm'])
    const lossyEml = {
      ...REF, layers: L.map((l, i) => (i === 2 ? { ...l, material: { table: [[380, 1.75, 0], [780, 1.75, 0.001]] as Array<[number, number, number]> } } : l)),
    }
    expect(errorsOf(withStack(lossyEml))[0]).toMatch(/^Stack layer 3 n,k table: the emitting layer must be non-absorbing/)
    const both = { ...REF, cathode: { material: { n: 1, table: [[380, 0.9, 6], [780, 1.1, 7]] } } }
    expect(errorsOf(withStack(both))).toEqual(['Cathode n: give either n and k or an n,k table, not both'])
  })
})

describe('thin-film sweep axes', () => {
  const sc = scenarioSchema.parse({ ...base, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } })
  it('sets a layer thickness by its index, the emitter position and the orientation', () => {
    const axes = [{ parameter: 'emitter.thinFilm.layers[3].thicknessNm' as const, values: [80] }, { parameter: 'emitter.thinFilm.horizontalDipoleFraction' as const, values: [0.9] }]
    expect(sweepRequestSchema.safeParse({ designId: '00000000-0000-4000-8000-000000000000', axes }).success).toBe(true)
    const r = cellScenario(sc, axes, [80, 0.9])
    expect(r.ok).toBe(true)
    if (!r.ok) return
    expect(r.scenario.emitter.thinFilm!.layers.map((l) => l.thicknessNm)).toEqual([100, 40, 20, 80])
    expect(r.scenario.emitter.thinFilm!.horizontalDipoleFraction).toBe(0.9)
    expect(sc.emitter.thinFilm!.layers[3]!.thicknessNm).toBe(50) // the base is untouched
    const pos = cellScenario(sc, [{ parameter: 'emitter.thinFilm.emitterPositionNm', values: [25] }], [25])
    expect(pos.ok ? '' : pos.reason).toMatch(/outside the emitting layer/)
  })
  it('names axes that do not apply', () => {
    expect(axisProblems(sc, [{ parameter: 'emitter.thinFilm.layers[4].thicknessNm', values: [1] }])[0]).toMatch(/the stack has 4 layers/)
    expect(axisProblems(sc, [{ parameter: 'reflector.reflectance', values: [1] }])[0]).toMatch(/the stack itself reflects/)
    const sheet = scenarioSchema.parse({ emitter: { index: 1.7 }, reflector: { reflectance: 0.8 }, substrate: base.substrate, lensArray: null })
    expect(axisProblems(sheet, [{ parameter: 'emitter.thinFilm.emitterPositionNm', values: [1] }])[0]).toMatch(/needs an OLED stack/)
  })
})

describe('the packed thin-film source', () => {
  const sc = scenarioSchema.parse(base)
  it('packs a block and a specular unit mirror in the reflector slots', () => {
    const s = packScene(sc)
    expect(s[S_THINFILM_OFFSET]).toBeGreaterThan(0)
    expect(s[S_REFLECTANCE]).toBe(1)
  })
  it('wavelength nodes: one at 550 nm without a spectrum, ≤ 5 nm apart over a Gaussian\'s ± 3 FWHM', () => {
    expect(thinFilmWavelengths(sc)).toEqual([550])
    const g = thinFilmWavelengths(scenarioSchema.parse({ ...base, emitter: { ...base.emitter, spectrum: { peakNm: 520, fwhmNm: 40 } } }))
    expect(g[0]).toBe(400)
    expect(g[g.length - 1]).toBe(640)
    expect(g.length).toBe(49)
  })
  it('the tabulated stack reflection equals the Airy recursion\'s R_s, R_p (stack.ts) on and between grid angles', () => {
    const src = thinFilmSource(sc)
    const rc = new Float64Array(4)
    const P = prepareStack(src.stack, 1.5, 550)
    for (const deg of [0, 30, 45.1, 60.2, 75]) {
      const t = (deg * Math.PI) / 180
      stackCoefficients(src.block, 0, 0, Math.cos(t), rc)
      const exact = stackReflectance(P, t)
      expect(Math.abs(rc[0]! ** 2 + rc[1]! ** 2 - exact.rs)).toBeLessThan(2e-5)
      expect(Math.abs(rc[2]! ** 2 + rc[3]! ** 2 - exact.rp)).toBeLessThan(2e-5)
    }
    // at normal incidence s and p coincide up to the sign convention (r_p = −r_s there; crossings.ts)
    stackCoefficients(src.block, 0, 0, 1, rc)
    expect(rc[2]!).toBeCloseTo(-rc[0]!, 8)
    expect(rc[3]!).toBeCloseTo(-rc[1]!, 8)
  })
  it('launch directions point up into the glass with the s share of the glass power', () => {
    const src = thinFilmSource(sc)
    const out = new Float64Array(3)
    let nP = 0
    const N = 4000
    for (let i = 0; i < N; i++) {
      nP += sampleThinFilmLaunch(src.block, 0, 0, (i + 0.5) / N, ((i * 7919) % N + 0.5) / N, 0.3, out)
      expect(out[2]!).toBeGreaterThanOrEqual(0)
      expect(Math.hypot(out[0]!, out[1]!, out[2]!)).toBeCloseTo(1, 12)
    }
    const p = src.nodes[0]!.point
    expect(nP / N).toBeCloseTo(p.glassP / (p.glassS + p.glassP), 3)
  })
})

describe('the exact flat device (thinfilm/flat.ts)', () => {
  it('polarised, lossless glass: equals the dipole module\'s own η_air (u integral, Neyts 1998 form) within 1e-5, and the channels close on the glass share', () => {
    const sc = scenarioSchema.parse({ ...base, trace: { fresnel: 'polarized' } })
    const src = thinFilmSource(sc)
    const flat = thinFilmFlat(sc, src)
    const p = src.nodes[0]!.point
    expect(Math.abs(flat.extraction - (p.airS + p.airP))).toBeLessThan(1e-5)
    expect(Math.abs(flat.glass - src.glassShare)).toBeLessThan(1e-5)
    expect(Math.abs(flat.extraction + flat.substrate + flat.trapped + flat.stackAbsorbed - flat.glass)).toBeLessThan(1e-12)
  })
  it('with glass absorption: equals the module\'s flat η_air with the same per-pass absorption', () => {
    const sc = scenarioSchema.parse({ ...base, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 1 }, trace: { fresnel: 'polarized' } })
    const src = thinFilmSource(sc)
    const flat = thinFilmFlat(sc, src)
    const p = thinFilmAt(src.stack, 550, { glassIndex: 1.5, glassThicknessUm: 700, glassAbsorptionPerMm: 1 })
    expect(Math.abs(flat.extraction - (p.airS + p.airP))).toBeLessThan(1e-5)
    expect(flat.substrate).toBeGreaterThan(0.1)
  })
})

describe('a thin-film run', () => {
  const sc = scenarioSchema.parse({ ...base, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 }, trace: { fresnel: 'polarized' } })
  it('traces no companion rays for an extended source, and any chunking gives the same result (seed 3)', () => {
    const run = prepareRun(sc)
    expect(run.planar).toBeNull()
    const whole = traceScenario(sc, { rays: 20_000, seed: 3 })
    const parts = { device: createTally(), planar: null }
    for (const [f, c] of [[0, 7_000], [7_000, 5_000], [12_000, 8_000]] as const) mergeRunTallies(parts, traceChunk(run, f, c, 3))
    expect(parts.device[T_STACK_ABSORBED]!).toBeGreaterThan(0)
    expect(summarize(parts, 3, 'polarized', null, sc)).toEqual(whole)
  })
  it('a disc pixel keeps a traced companion for its footprint tally; the planar block is still the exact one', () => {
    const disc = scenarioSchema.parse({ ...sc, emitter: { ...sc.emitter, source: { shape: 'disc', radiusUm: 30 } } })
    expect(prepareRun(disc).planar).not.toBeNull()
    const r = traceScenario(disc, { rays: 5_000, seed: 4 })
    expect(r.planar.method).toBe('quadrature')
    expect(r.pixel).not.toBeNull()
  })
})
