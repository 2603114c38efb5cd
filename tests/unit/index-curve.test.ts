// The editor's n(λ) plot (app/utils/charts/indexCurve.ts).
import { describe, expect, it } from 'vitest'
import { indexCurve, indexCurveCsv, indexCurveOption } from '../../app/utils/charts/indexCurve'

// N-BK7 Sellmeier coefficients (the glass maker's datasheet): n = 1.5168 at 587.6 nm.
const BK7 = {
  sellmeier: { B: [1.03961212, 0.231792344, 1.01046945] as [number, number, number], C: [0.00600069867, 0.0200179144, 103.560653] as [number, number, number] },
}

describe('n(λ) over the spectrum', () => {
  it('samples the spectrum span; BK7 through 587.6 nm reads 1.5168 (datasheet) and falls with λ (normal dispersion)', () => {
    const c = indexCurve(BK7, [587.6, 656.3], 2)
    expect(c.nm).toEqual([587.6, 656.3])
    expect(c.n[0]).toBeCloseTo(1.5168, 4)
    expect(c.n[1]!).toBeLessThan(c.n[0]!)
    expect(c.k).toBeNull()
  })
  it('a line spectrum shows ±100 nm around the line, marked', () => {
    const c = indexCurve(1.5, [550, 550])
    expect(c.spanNm).toEqual([450, 650])
    expect(c.lineNm).toBe(550)
    expect(JSON.stringify(indexCurveOption(c))).toContain('emission 550 nm')
  })
  it('an n,k table plots k on a second axis and leaves no-real-n points empty in the CSV', () => {
    const t = indexCurve({ table: [[400, 1.6, 1e-4], [800, 1.55, 0]] }, [400, 800], 3)
    expect(t.k).toEqual([1e-4, 5e-5, 0])
    expect((indexCurveOption(t).yAxis as unknown[]).length).toBe(2)
    // Sellmeier with a pole inside the span: n² = 1 − 2.5 < 0 at 500 nm → no real n there
    const pole = indexCurve({ sellmeier: { B: [0.5, 0, 0], C: [0.3, 0, 0] } }, [500, 600], 3)
    expect(indexCurveCsv(pole).rows[0]).toEqual([500, null])
  })
})

describe('spectrum in a result\'s settings', async () => {
  const { describeSpectrum } = await import('../../app/utils/spectrum')
  it('names each form with its unit', () => {
    expect(describeSpectrum(undefined)).toBe('none (550 nm line, no colour figures)')
    expect(describeSpectrum({ wavelengthNm: 530 })).toBe('line at 530 nm')
    expect(describeSpectrum({ peakNm: 530, fwhmNm: 40 })).toBe('Gaussian, peak 530 nm, FWHM 40 nm')
    expect(describeSpectrum({ table: [[480, 0], [620, 0]] })).toBe('table of 2 rows, 480–620 nm')
  })
})
