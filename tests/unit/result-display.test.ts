// Result display helpers (shared/utils/format.ts, app/utils/resultMath.ts, app/utils/exportData.ts). The
// half-luminance angle and its σ come from the engine (tested in tests/physics).
import { describe, expect, it } from 'vitest'
import { pctErr, withErr, num } from '../../shared/utils/format'
import { binomialStdErr } from '../../app/utils/resultMath'
import { toCsv } from '../../app/utils/exportData'

describe('figures with σ', () => {
  it('rounds value and σ to the σ\'s second significant digit, with the unit', () => {
    expect(withErr(1.98765, 0.0301, '×')).toBe('1.988 ± 0.030 ×')
    expect(pctErr(0.342049, 0.00274)).toBe('34.20 ± 0.27 %')
    expect(withErr(53.127, 0.4, '°')).toBe('53.13 ± 0.40°')
    expect(withErr(null, 0.1, 'µm')).toBe('—')
    expect(num(6.25, 'µm')).toBe('6.25 µm')
  })

  it('binomial σ: 4.0e-4 at p = 0.2, N = 10⁶ (binomial variance p(1−p)/N, standard statistics)', () => {
    expect(binomialStdErr(0.2, 1e6)).toBeCloseTo(4.0e-4, 8)
    expect(binomialStdErr(0.2, 0)).toBe(0)
  })

  it('CSV quotes commas, quotes and line breaks (RFC 4180) and leaves non-finite numbers empty', () => {
    expect(toCsv(['a', 'b'], [['x,y', 'say "hi"'], [1.5, NaN]])).toBe('"a","b"\r\n"x,y","say ""hi"""\r\n1.5,\r\n')
  })
})
