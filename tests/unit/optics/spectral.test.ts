// Wavelength and dispersive indices: index formulas against a maker's datasheet value, the spectrum's inverse CDF,
// and refusal of bad spectra and materials with the field named.
import { describe, expect, it } from 'vitest'
import { indexAt, parseScenario, scenarioSchema, type ScenarioInput } from '../../../shared/types/scenario'
import { packScene, S_SPECTRAL_OFFSET } from '../../../shared/optics/scene'
import { sampleWavelength, SP_AS, SP_NS, spectralValue, SPECTRAL_GRID } from '../../../shared/optics/spectral'

const bk7 = { sellmeier: { B: [1.03961212, 0.231792344, 1.01046945] as [number, number, number], C: [0.00600069867, 0.0200179144, 103.560653] as [number,
  number, number] } }
const base: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic' },
  reflector: { reflectance: 0.8 },
  substrate: { index: 1.5, thicknessUm: 100 },
  lensArray: null,
}

describe('index formulas', () => {
  it('N-BK7 Sellmeier: n = 1.5168 at 587.6 nm (the glass maker\'s datasheet: SCHOTT N-BK7, nd 1.51680)', () => {
    expect(indexAt(bk7, 587.56)).toBeCloseTo(1.5168, 4)
  })
  it('N-BK7 Sellmeier: nF 1.52238 at 486.1 nm and nC 1.51432 at 656.3 nm (same datasheet; values from memory)', () => {
    expect(indexAt(bk7, 486.13)).toBeCloseTo(1.52238, 4)
    expect(indexAt(bk7, 656.27)).toBeCloseTo(1.51432, 4)
  })
  it('Cauchy n = A + B/λ² + C/λ⁴ (λ in µm) and an n,k table interpolate as written (closed form)', () => {
    expect(indexAt({ cauchy: { A: 1.5, B: 0.005, C: 0 } }, 500)).toBeCloseTo(1.5 + 0.005 / 0.25, 12)
    expect(indexAt({ table: [[400, 1.6, 0], [600, 1.5, 0]] }, 450)).toBeCloseTo(1.575, 12)
  })
})

describe('spectrum sampling and the packed tables', () => {
  it('a Gaussian 530 / 60 nm: the inverse-CDF mean is 530 nm and the FWHM-derived σ 25.48 nm (closed form)', () => {
    const sc = scenarioSchema.parse({ ...base, emitter: { ...base.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } } })
    const s = packScene(sc), at = s[S_SPECTRAL_OFFSET]!
    const cell = new Float64Array(2)
    let m1 = 0, m2 = 0
    const M = 20000
    for (let i = 0; i < M; i++) { const l = sampleWavelength(s, at, (i + 0.5) / M, cell); m1 += l; m2 += l * l }
    m1 /= M; m2 /= M
    expect(m1).toBeCloseTo(530, 1)
    expect(Math.sqrt(m2 - m1 * m1)).toBeCloseTo(60 / (2 * Math.sqrt(2 * Math.LN2)), 0) // ±3 FWHM truncation is < 1e-9 of the mass
  })
  it('a line spectrum puts every ray at its wavelength; the tables hold n(λ) and the 4πk/λ absorption', () => {
    const sc = scenarioSchema.parse({ ...base, emitter: { ...base.emitter, spectrum: { wavelengthNm: 610 } }, substrate: { index: { table: [[400, 1.6, 1e-5],
      [800, 1.5, 1e-5]] }, thicknessUm: 100, absorptionPerMm: 1 } })
    const s = packScene(sc), at = s[S_SPECTRAL_OFFSET]!
    const cell = new Float64Array(2)
    for (const u of [0.001, 0.5, 0.999]) expect(sampleWavelength(s, at, u, cell)).toBe(610)
    expect(spectralValue(s, at, SP_NS, 0, 0)).toBeCloseTo(1.6 - 0.1 * (210 / 400), 12)
    expect(spectralValue(s, at, SP_AS, SPECTRAL_GRID - 1, 1)).toBeCloseTo(1e-3 + (4 * Math.PI * 1e-5) / 0.61, 12)
  })
  it('without a spectrum the scene has no spectral block and a formula index is taken at 550 nm', () => {
    const s = packScene(scenarioSchema.parse({ ...base, substrate: { index: bk7, thicknessUm: 100 } }))
    expect(s[S_SPECTRAL_OFFSET]).toBe(0)
    expect(s[2]).toBeCloseTo(indexAt(bk7, 550), 14)
  })
})

describe('bad spectra and materials are refused with the field named in the trade\'s words', () => {
  const refused = (input: unknown, field: string, words: string) => {
    const r = parseScenario(input)
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.errors.join('\n'), r.errors.join('\n')).toMatch(new RegExp(`${field.replace(/\./g, '\\.')}.*${words.replace(/\./g, '\\.')}`))
  }
  it('negative wavelength', () => refused({ ...base, emitter: { ...base.emitter, spectrum: { wavelengthNm: -530 } } }, 'Emission wavelength', 'must be at least 200 nm: got -530 nm'))
  it('a spectrum table with one row', () => refused({ ...base, emitter: { ...base.emitter, spectrum: { table: [[530, 1]] } } }, 'Emission spectrum table', 'at least 2 rows: got 1'))
  it('an index table with one row', () => refused({ ...base, substrate: { index: { table: [[530, 1.5, 0]] }, thicknessUm: 100 } }, 'Substrate index table', 'at least 2 rows: got 1'))
  it('a Sellmeier formula giving n < 1 inside the spectrum', () => refused({ ...base, emitter: { ...base.emitter, spectrum: { peakNm: 500, fwhmNm: 50 } }, substrate: { index: { sellmeier: { B: [-0.5, 0, 0], C: [0.01, 0, 0] } }, thicknessUm: 100 } }, 'Substrate index', 'Sellmeier formula gives n'))
  it('k < 0', () => refused({ ...base, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, index: { table: [[400, 1.5, -0.001], [700, 1.5, 0]] } } }, 'Lens index table row 1, k', 'must be at least 0: got -0.001'))
  it('an index table that does not cover the spectrum', () => refused({ ...base, emitter: { ...base.emitter, spectrum: { table: [[380, 1], [780, 1]] } }, substrate: { index: { table: [[400, 1.5, 0], [700, 1.5, 0]] }, thicknessUm: 100 } }, 'Substrate index', 'covers 400–700 nm'))
})

describe('inverse-CDF search through the guide table', () => {
  it('lands on the cell a bisection finds, for every u of a fine grid (Gaussian, gappy table, line)', async () => {
    const { buildSpectralBlock, sampleWavelength, SP_CDF, SPECTRAL_GRID, spectralSlot } = await import('../../../shared/optics/spectral')
    const { scenarioSchema } = await import('../../../shared/types/scenario')
    const spectra = [
      { peakNm: 530, fwhmNm: 60 },
      { table: [[400, 0], [420, 1], [430, 0], [600, 0], [610, 3], [620, 0]] as Array<[number, number]> },
      { wavelengthNm: 610 },
    ]
    for (const spectrum of spectra) {
      const sc = scenarioSchema.parse({
        emitter: { index: 1.7, spectrum }, reflector: { reflectance: 0.8 }, substrate: { index: 1.5, thicknessUm: 10 }, lensArray: null,
      })
      const block = buildSpectralBlock(sc, sc.substrate.index)
      const cell = new Float64Array(2)
      let mismatches = 0
      for (let i = 0; i < 20_011; i++) {
        const u = (i + 0.5) / 20_011
        let lo = 0, hi = SPECTRAL_GRID
        while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (block[spectralSlot(mid, SP_CDF)]! <= u) lo = mid; else hi = mid }
        sampleWavelength(block, 0, u, cell)
        if (cell[0] !== lo) mismatches++
      }
      expect(mismatches).toBe(0)
    }
  })
})
