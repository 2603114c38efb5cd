import { describe, expect, it } from 'vitest'
import { bandSolidAngleSr, poolLeadingBins } from '../../app/utils/resultMath'

const DEG = Math.PI / 180

describe('near-axis pooling of the 1° bins', () => {
  it('solid angle of the whole hemisphere is 2π sr (closed form)', () => {
    let s = 0
    for (let b = 0; b < 90; b++) s += bandSolidAngleSr(b, b + 1)
    expect(s).toBeCloseTo(2 * Math.PI, 12)
  })

  it('pooling exact Lambertian bin averages over 0–5° gives the band average sin²5°/(2π(1 − cos 5°)) sr⁻¹', () => {
    // Lambertian of unit flux, I = cosθ/π; the average over a band is ∫I dΩ/∫dΩ = (sin²θb − sin²θa)/(2π(cosθa − cosθb))
    // (integral of cosθ sinθ; any radiometry text, e.g. McCluney, "Introduction to Radiometry and Photometry", ch. 2).
    const bandAvg = (a: number, b: number) => (Math.sin(b * DEG) ** 2 - Math.sin(a * DEG) ** 2) / (2 * Math.PI * (Math.cos(a * DEG) - Math.cos(b * DEG)))
    const v = [0, 1, 2, 3, 4].map((b) => bandAvg(b, b + 1))
    const w = [0, 1, 2, 3, 4].map((b) => bandSolidAngleSr(b, b + 1))
    const pooled = poolLeadingBins(v, v.map(() => 0), w, 5)
    expect(pooled.value).toBeCloseTo(bandAvg(0, 5), 12)
  })

  it('σ of the pool equals the σ of the summed counts: binomial √(c)/(N ΣΔΩ) for small shares (Poisson limit)', () => {
    const n = 1e6, counts = [30, 95, 160, 220, 290]
    const w = counts.map((_, b) => bandSolidAngleSr(b, b + 1))
    const v = counts.map((c, i) => c / (n * w[i]!))
    const e = counts.map((c, i) => Math.sqrt(c * (1 - c / n)) / (n * w[i]!))
    const pooled = poolLeadingBins(v, e, w, 5)
    const total = counts.reduce((a, b) => a + b, 0)
    const sw = w.reduce((a, b) => a + b, 0)
    expect(pooled.value).toBeCloseTo(total / (n * sw), 12)
    // independent-bin σ vs the binomial σ of the summed count: they differ by the multinomial covariance only
    const binomial = Math.sqrt(total * (1 - total / n)) / (n * sw)
    expect(Math.abs(pooled.stdErr - binomial) / binomial).toBeLessThan(1e-3)
    // and the pool is less noisy, relative to its value, than the first bin on its own
    expect(pooled.stdErr / pooled.value).toBeLessThan(e[0]! / v[0]!)
  })
})
