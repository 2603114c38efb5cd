// Sweep figures from colour: the cell summary carries maxDeltaUvTo60 and photopicOnAxisGain (with σ), a sweep ranks
// the colour shift lowest-first and the photopic gain highest-first, and a design without a spectrum has neither.
import { describe, expect, it } from 'vitest'
import { prepareRun, summarize, traceChunk } from '../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import { figureSchema } from '../../shared/types/sweep'
import { bestCellIndex as bestCell, cellSummaryOf as cellSummary, FIGURE_KEYS, FIGURES, figureOf, type CellSummary } from '../../shared/types/figures'

const design: ScenarioInput = {
  emitter: { index: 1.7, angularProfile: 'isotropic', spectrum: { peakNm: 530, fwhmNm: 60 } },
  reflector: { reflectance: 0.8 },
  substrate: { index: 1.5, thicknessUm: 100 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' },
}

describe('colour figures for sweeps', () => {
  it('are valid figures; the colour shift is the one ranked lowest-first; both need a spectrum', () => {
    expect(figureSchema.parse('maxDeltaUvTo60')).toBe('maxDeltaUvTo60')
    expect(figureSchema.parse('photopicOnAxisGain')).toBe('photopicOnAxisGain')
    expect(FIGURE_KEYS.filter((k) => FIGURES[k].better === 'lower')).toEqual(['maxDeltaUvTo60', 'edgeLoss'])
    expect(FIGURE_KEYS.filter((k) => (FIGURES[k] as { needs?: string }).needs === 'spectrum').sort()).toEqual(['maxDeltaUvTo60', 'photopicOnAxisGain'])
  })
  it('the cell summary carries them with σ (a spectral run) and null without a spectrum', () => {
    const r = summarize(traceChunk(prepareRun(scenarioSchema.parse(design)), 0, 20_000, 2), 2)
    const s = cellSummary(r)
    expect(s.maxDeltaUvTo60).toBe(r.colour!.maxDeltaUvTo60)
    expect(s.maxDeltaUvTo60StdErr!).toBeGreaterThan(0)
    expect(s.photopicOnAxisGain).toBe(r.photopicOnAxisGain)
    expect(figureOf(s, 'photopicOnAxisGain')).toEqual({ value: r.photopicOnAxisGain, stdErr: r.photopicOnAxisGainStdErr })
    const mono = cellSummary(summarize(traceChunk(prepareRun(scenarioSchema.parse({ ...design, emitter: { index: 1.7, angularProfile: 'isotropic' } })), 0, 2000, 2), 2))
    expect(mono.maxDeltaUvTo60 ?? null).toBeNull()
    expect(figureOf(mono, 'maxDeltaUvTo60')).toBeNull()
  })
  it('best cell: lowest colour shift, highest photopic gain', () => {
    const cell = (i: number, d: number, g: number) => ({ cellIndex: i, status: 'done' as const, summary: { maxDeltaUvTo60: d, maxDeltaUvTo60StdErr: 0.001, photopicOnAxisGain: g, photopicOnAxisGainStdErr: 0.01 } as unknown as CellSummary })
    const cells = [cell(0, 0.02, 1.2), cell(1, 0.005, 1.1), cell(2, 0.03, 1.6)]
    expect(bestCell(cells, 'maxDeltaUvTo60')).toBe(1)
    expect(bestCell(cells, 'photopicOnAxisGain')).toBe(2)
  })
})
