// Stylus-trace fitting (shared/utils/profile-fit.ts), pure: closed forms and hand-worked examples.
import { describe, expect, it } from 'vitest'
import { asphereHeightUm, fitProblems, fitProfile, isotonicNonIncreasing, symmetricSmooth, type AsphereParams } from '../../shared/utils/profile-fit'

const grid = (n: number, rimUm: number) => Array.from({ length: n }, (_, i) => (i * rimUm) / (n - 1))

describe('isotonic regression (pool-adjacent-violators; Ayer et al. 1955, Barlow et al. 1972)', () => {
  it('matches a hand-worked example', () => {
    // 5, 3, 4, 1, 2: (3, 4) pool to 3.5, (1, 2) pool to 1.5; worked by hand.
    expect(isotonicNonIncreasing([5, 3, 4, 1, 2])).toEqual([5, 3.5, 3.5, 1.5, 1.5])
    // 1, 2, 3 all violate: one block at the mean 2; weights 1, 1, 2 give (1 + 2 + 6)/4 = 2.25.
    expect(isotonicNonIncreasing([1, 2, 3])).toEqual([2, 2, 2])
    expect(isotonicNonIncreasing([1, 2, 3], [1, 1, 2])).toEqual([2.25, 2.25, 2.25])
  })
  it('leaves a non-increasing sequence unchanged and always returns a non-increasing one', () => {
    expect(isotonicNonIncreasing([4, 4, 2, 0])).toEqual([4, 4, 2, 0])
    const y = [3, 3.2, 2.9, 3.1, 1, 1.4, 0.2, 0.3, 0]
    const f = isotonicNonIncreasing(y)
    for (let i = 1; i < f.length; i++) expect(f[i]!).toBeLessThanOrEqual(f[i - 1]!)
    // The least-squares fit keeps the sum (the KKT condition of the pooled means).
    expect(f.reduce((a, b) => a + b, 0)).toBeCloseTo(y.reduce((a, b) => a + b, 0), 12)
  })
})

describe('symmetric smoothing', () => {
  it('is a centred mean that narrows at the ends and keeps a straight line', () => {
    expect(symmetricSmooth([0, 3, 6, 9, 12], 3)).toEqual([0, 3, 6, 9, 12])
    expect(symmetricSmooth([0, 0, 3, 0, 0], 3)).toEqual([0, 1, 1, 1, 0])
  })
})

describe('even-asphere least squares', () => {
  const cases: Array<[string, AsphereParams, number]> = [
    ['sphere R = 12 µm', { z0Um: 2.1, curvaturePerUm: 1 / 12, radiusUm: 12, conicConstant: 0, asphereCoefficients: [] }, 0],
    ['conic k = −0.6, R = 9 µm', { z0Um: 3, curvaturePerUm: 1 / 9, radiusUm: 9, conicConstant: -0.6, asphereCoefficients: [] }, 0],
    ['conic k = 0.3 with A4 = −2e−5 µm⁻³', { z0Um: 2.5, curvaturePerUm: 1 / 15, radiusUm: 15, conicConstant: 0.3, asphereCoefficients: [-2e-5] }, 1],
  ]
  for (const [label, p, terms] of cases) {
    it(`recovers a noiseless ${label} to 1e-9 µm with RMS residual 0 (closed-form sag)`, () => {
      const r = grid(61, 6)
      const rows = r.map((v) => [v, asphereHeightUm(p, v)])
      const fit = fitProfile(rows, { method: 'asphere', asphereTerms: terms })
      for (const [v, z] of fit.rows) expect(Math.abs(z! - asphereHeightUm(p, v!))).toBeLessThan(1e-9)
      expect(fit.rmsResidualNm).toBeLessThan(1e-6)
      expect(fitProblems(fit, r.map((_, i) => i + 2))).toEqual([])
    })
  }
  it('returns the vertex radius and conic constant of a noiseless conic (terms = 0)', () => {
    const p: AsphereParams = { z0Um: 3, curvaturePerUm: 1 / 9, radiusUm: 9, conicConstant: -0.6, asphereCoefficients: [] }
    const fit = fitProfile(grid(41, 6).map((v) => [v, asphereHeightUm(p, v)]), { method: 'asphere' })
    expect(fit.params!.radiusUm).toBeCloseTo(9, 6)
    expect(fit.params!.conicConstant).toBeCloseTo(-0.6, 6)
  })
})

describe('fitting a noisy trace and refusing what cannot be a cap', () => {
  // A sphere R = 10 µm cut at r = 5 µm (sag R − √(R² − r²) = 1.340 µm) with a fixed ±2 nm ripple: a 2 nm rise near the rim.
  const sphere = (r: number) => Math.sqrt(100 - r * r) - Math.sqrt(75)
  const r = grid(51, 5)
  const noisy = r.map((v, i) => [v, sphere(v) + (i % 2 ? 0.002 : -0.002) + (i === 50 ? 0.004 : 0)])
  const lines = r.map((_, i) => i + 2)
  it('the isotonic fit is non-increasing with an RMS residual of the ripple size', () => {
    const fit = fitProfile(noisy, { method: 'isotonic', smoothPoints: 5 })
    for (let i = 1; i < fit.rows.length; i++) expect(fit.rows[i]![1]!).toBeLessThanOrEqual(fit.rows[i - 1]![1]!)
    expect(fit.rmsResidualNm).toBeGreaterThan(1)
    expect(fit.rmsResidualNm).toBeLessThan(5)
    expect(fitProblems(fit, lines)).toEqual([])
  })
  it('the sphere fit recovers R = 10 µm within the noise', () => {
    const fit = fitProfile(noisy.map(([v, z]) => [v!, z! + 0.002]), { method: 'asphere' })
    expect(fit.params!.radiusUm).toBeGreaterThan(9.8)
    expect(fit.params!.radiusUm).toBeLessThan(10.2)
    expect(fitProblems(fit, lines)).toEqual([])
  })
  it('a second bump (not noise) is refused with its line', () => {
    const bumped = r.map((v) => [v, sphere(v) + (v > 3 && v < 4 ? 0.2 : 0)])
    const problems = fitProblems(fitProfile(bumped, { method: 'isotonic' }), lines)
    expect(problems.join(' ')).toMatch(/line \d+: the trace departs from the fitted cap by .* nm, more than 2 % of the sag/)
  })
})
