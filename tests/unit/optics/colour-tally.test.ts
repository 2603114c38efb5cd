// The colour block of a tally: layout, exact merges, transferable buffers, and the colour figures of known counts
// (closed forms from the CIE 1931 table, cie1931.ts; CIE 1976 UCS u′ = 4X/(X+15Y+3Z), v′ = 9Y/(X+15Y+3Z)).
import { describe, expect, it } from 'vitest'
import {
  CIE_X, CIE_Y, CIE_Z, colourBinOf, colourOf, COLOUR_AXIS_ROW, COLOUR_BINS, COLOUR_LAUNCH_ROW, createTally, deltaUvOf, mergeRunTallies,
  prepareRun, rowColour, runTalliesFromBuffer, runTalliesToBuffer, SPECTRAL_TALLY_LENGTH, summarize, T_COLOUR, T_RAYS, TALLY_LENGTH, traceChunk,
} from '../../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../../shared/types/scenario'

const base: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic' },
  reflector: { reflectance: 0.8 },
  substrate: { index: 1.5, thicknessUm: 100 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' },
}
const spectral: ScenarioInput = { ...base, emitter: { ...base.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } } }

const cell = (row: number, bin: number) => T_COLOUR + row * COLOUR_BINS + bin

describe('colour tally', () => {
  it('wavelength bins are centred on the CIE rows (380 + 5j nm ± 2.5 nm), everything else in bin 81', () => {
    expect(colourBinOf(380)).toBe(0)
    expect(colourBinOf(377.5)).toBe(0)
    expect(colourBinOf(377.49)).toBe(81)
    expect(colourBinOf(382.5)).toBe(1)
    expect(colourBinOf(555)).toBe(35)
    expect(colourBinOf(782.49)).toBe(80)
    expect(colourBinOf(782.5)).toBe(81)
    expect(colourBinOf(250)).toBe(81)
  })
  it('no spectrum: the tally keeps its old length and the result has no colour fields', () => {
    const run = prepareRun(scenarioSchema.parse(base))
    const t = traceChunk(run, 0, 2000, 3)
    expect(t.device.length).toBe(TALLY_LENGTH)
    const r = summarize(t, 3)
    expect('colour' in r).toBe(false)
    expect('photopicOnAxisGain' in r).toBe(false)
  })
  it('with a spectrum: colour block on device and companion; every ray launched once, every extracted one in one band', () => {
    const run = prepareRun(scenarioSchema.parse(spectral))
    const t = traceChunk(run, 0, 3000, 3)
    expect(t.device.length).toBe(SPECTRAL_TALLY_LENGTH)
    expect(t.planar!.length).toBe(SPECTRAL_TALLY_LENGTH)
    let launched = 0
    for (let j = 0; j < COLOUR_BINS; j++) launched += t.device[cell(COLOUR_LAUNCH_ROW, j)]!
    expect(launched).toBe(3000)
    const r = summarize(t, 3)
    expect(r.colour!.bandCentersDeg).toHaveLength(45)
    expect(r.colour!.wavelengthCentersNm[0]).toBe(380)
    expect(r.colour!.spectra.anglesDeg).toEqual([1, 31, 61])
    expect(r.planarColour).not.toBeNull()
    expect(r.photopicOnAxisGain!).toBeGreaterThan(0)
  })
  it('merges are exact and order-free; a plain total widens to take colour chunks; buffers round-trip at every length', () => {
    const run = prepareRun(scenarioSchema.parse(spectral))
    const a = traceChunk(run, 0, 1500, 9), b = traceChunk(run, 1500, 1500, 9)
    const ab = { device: createTally(), planar: createTally() }
    mergeRunTallies(ab, a); mergeRunTallies(ab, b)
    const ba = { device: createTally(true), planar: createTally(true) }
    mergeRunTallies(ba, b); mergeRunTallies(ba, a)
    expect(Array.from(ab.device)).toEqual(Array.from(ba.device))
    expect(Array.from(ab.planar!)).toEqual(Array.from(ba.planar!))
    expect(ab.device[T_RAYS]).toBe(3000)
    for (const t of [
      ab, { device: ab.device, planar: null }, traceChunk(prepareRun(scenarioSchema.parse(base)), 0, 500, 1), { device: createTally(), planar: null },
    ]) {
      const back = runTalliesFromBuffer(runTalliesToBuffer(t))
      expect(Array.from(back.device)).toEqual(Array.from(t.device))
      expect(back.planar === null).toBe(t.planar === null)
    }
    expect(() => runTalliesFromBuffer(new Float64Array(TALLY_LENGTH + 1).buffer)).toThrow(/run buffer/)
  })
})

describe('colour figures of known counts', () => {
  it('one wavelength (555 nm): x, y, u′, v′ of the table row, σ = 0 (every ray the same colour)', () => {
    const t = createTally(true)
    t[cell(3, 35)] = 400
    const c = rowColour(t, 3)!
    const X = CIE_X[35]!, Y = CIE_Y[35]!, Z = CIE_Z[35]!
    expect(c.x).toBeCloseTo(X / (X + Y + Z), 14)
    expect(c.u).toBeCloseTo((4 * X) / (X + 15 * Y + 3 * Z), 14)
    expect(c.v).toBeCloseTo((9 * Y) / (X + 15 * Y + 3 * Z), 14)
    expect(c.varU).toBeCloseTo(0, 20)
    expect(c.varX).toBeCloseTo(0, 20)
    expect(c.varV).toBeCloseTo(0, 20)
  })
  it('two wavelengths: the delta-method variance of u′ equals Σ c_j (∂u′/∂c_j)² by finite differences', () => {
    const t = createTally(true)
    t[cell(2, 14)] = 300; t[cell(2, 54)] = 500 // 450 and 650 nm
    const c = rowColour(t, 2)!
    const u = (c1: number, c2: number) => {
      const X = c1 * CIE_X[14]! + c2 * CIE_X[54]!, Y = c1 * CIE_Y[14]! + c2 * CIE_Y[54]!, Z = c1 * CIE_Z[14]! + c2 * CIE_Z[54]!
      return (4 * X) / (X + 15 * Y + 3 * Z)
    }
    const h = 1e-4
    const g1 = (u(300 + h, 500) - u(300 - h, 500)) / (2 * h), g2 = (u(300, 500 + h) - u(300, 500 - h)) / (2 * h)
    expect(c.u).toBeCloseTo(u(300, 500), 14)
    expect(c.varU / (300 * g1 * g1 + 500 * g2 * g2)).toBeCloseTo(1, 6)
  })
  it('Δu′v′ and its σ: the projection of the two bands\' variances on the difference', () => {
    const a = { x: 0, y: 0, varX: 0, varY: 0, u: 0.2, v: 0.5, varU: 1e-6, varV: 4e-6, covUV: 0 }
    const b = { x: 0, y: 0, varX: 0, varY: 0, u: 0.23, v: 0.54, varU: 2e-6, varV: 1e-6, covUV: 0 }
    const d = deltaUvOf(b, a)
    expect(d.value).toBeCloseTo(0.05, 12)
    // (0.6² · 3e-6 + 0.8² · 5e-6)^½
    expect(d.stdErr).toBeCloseTo(Math.sqrt(0.36 * 3e-6 + 0.64 * 5e-6), 12)
  })
  it('photopic figures against the launched row: all launched light in the on-axis cone gives 1/sin²5°', () => {
    const t = createTally(true)
    t[cell(COLOUR_LAUNCH_ROW, 35)] = 1000; t[cell(COLOUR_AXIS_ROW, 35)] = 1000; t[cell(0, 35)] = 1000
    const c = colourOf(t)!
    expect(c.photopicOnAxisRelative).toBeCloseTo(1 / Math.sin((5 * Math.PI) / 180) ** 2, 10)
    expect(c.photopicOnAxisRelativeStdErr).toBeCloseTo(0, 12)
    expect(c.luminousEfficacyLmPerW).toBeCloseTo(683, 10)
    expect(c.maxDeltaUvTo60).toBe(0)
  })
})

describe('colour exports', () => {
  it('trajectory rows every 10° to 80° and the per-band CSV of device and flat companion, σ beside each value', async () => {
    const { colourCsv, colourTrajectory, COLOUR_CSV_HEADER } = await import('../../../app/utils/exportData')
    const r = summarize(traceChunk(prepareRun(scenarioSchema.parse(spectral)), 0, 20_000, 5), 5)
    const rows = colourTrajectory(r.colour!, 80, 5)
    expect(rows.map((x) => x.angleDeg)).toEqual([1, 11, 21, 31, 41, 51, 61, 71])
    expect(rows[0]!.deltaUv).toBe(0)
    expect(rows[3]!.uPrimeStdErr!).toBeGreaterThan(0)
    expect(rows[3]!.xStdErr!).toBeGreaterThan(0)
    const lines = colourCsv(r.colour!, r.planarColour!).trim().split('\r\n')
    expect(lines[0]).toBe(COLOUR_CSV_HEADER.map((h) => `"${h}"`).join(','))
    expect(lines).toHaveLength(1 + 2 * 45)
  })
})
