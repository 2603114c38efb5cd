import { describe, expect, it } from 'vitest'
import { contrastRatio, labelColour, rampColour, relativeLuminance, withinNoiseOfBest } from '../../app/utils/sweepCells'
import { HEAT_RAMP } from '../../app/utils/palette'

describe('withinNoiseOfBest (difference of independent estimates, σ_diff = √(σ1² + σ2²))', () => {
  const best = { cellIndex: 5, value: 2.081, stdErr: 0.0246 }
  it('counts a cell 0.0074 below with σ 0.0244 as within noise (0.0074 < 2·0.0346)', () => {
    expect(withinNoiseOfBest(best, [{ cellIndex: 11, value: 2.0736, stdErr: 0.0244 }]).map((c) => c.cellIndex)).toEqual([11])
  })
  it('leaves out a cell 0.1 below (0.1 > 2·0.0346) and the best cell itself', () => {
    expect(withinNoiseOfBest(best, [best, { cellIndex: 3, value: 1.981, stdErr: 0.0244 }])).toEqual([])
  })
  it('uses the root sum of squares, not the sum: 3-4-5 case (σ 3 and 4 → σ_diff 5, limit 10 at k = 2)', () => {
    const b = { cellIndex: 0, value: 100, stdErr: 3 }
    expect(withinNoiseOfBest(b, [{ cellIndex: 1, value: 90.01, stdErr: 4 }])).toHaveLength(1)
    expect(withinNoiseOfBest(b, [{ cellIndex: 1, value: 89.99, stdErr: 4 }])).toHaveLength(0)
  })
})

describe('heat-map label colour (WCAG 2.1 relative luminance and contrast)', () => {
  it('white and black: luminance 1 and 0, contrast 21:1 (WCAG 2.1 definition)', () => {
    expect(relativeLuminance('#ffffff')).toBeCloseTo(1, 10)
    expect(relativeLuminance('#000000')).toBeCloseTo(0, 10)
    expect(contrastRatio('#ffffff', '#000000')).toBeCloseTo(21, 10)
  })
  it('ramp ends are the stops', () => {
    expect(rampColour(0)).toBe(HEAT_RAMP[0])
    expect(rampColour(1)).toBe(HEAT_RAMP[HEAT_RAMP.length - 1])
  })
  // With two label colours the worst shade is where both contrast equally: L = √(1.05·(L_ink + 0.05)) − 0.05,
  // contrast 1.05/(L + 0.05) ≈ 4.05:1 for ink #17202b; a continuous light-to-dark ramp must pass it. So the bound
  // checked is 4:1 (above WCAG 2.1's 3:1 for large/bold text; the chart adds a halo of the other colour).
  it('every shade of the ramp gets a label with at least 4:1 contrast, and the light end dark text', () => {
    for (let i = 0; i <= 200; i++) {
      const t = i / 200
      expect(contrastRatio(rampColour(t), labelColour(t)), `t = ${t}`).toBeGreaterThanOrEqual(4)
    }
    expect(labelColour(0)).toBe('#17202b')
    expect(labelColour(1)).toBe('#ffffff')
  })
})
