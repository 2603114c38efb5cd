// Small derived numbers for result displays (pure; unit-tested).

/** Binomial standard error √(p(1−p)/N) (the binomial variance p(1−p)/N of a proportion: 4.0e-4 at p = 0.2, N = 10⁶). */
export function binomialStdErr(p: number, n: number): number {
  return n > 0 ? Math.sqrt(Math.max(0, p * (1 - p)) / n) : 0
}

/** Solid angle of the polar band [θa, θb] (degrees): 2π(cos θa − cos θb) sr. */
export function bandSolidAngleSr(thetaLowDeg: number, thetaHighDeg: number): number {
  const d = Math.PI / 180
  return 2 * Math.PI * (Math.cos(thetaLowDeg * d) - Math.cos(thetaHighDeg * d))
}

/**
 * Pools the first `bins` 1° bins of a per-bin density (value per unit weight) into one value with its σ:
 * Σ vᵢwᵢ / Σ wᵢ, σ = √(Σ (σᵢwᵢ)²) / Σ wᵢ. This is the density of the summed counts over the summed weight, so it
 * equals tracing the band as one bin; near the axis the bins are tiny (ΔΩ ∝ sin θ) and their own estimates are
 * noisy, the pooled one is not. The σ treats the bins' counts as independent (they are multinomial, with
 * covariance −cᵢcⱼ/N, negligible for bins holding a small share of the rays).
 * Weights: solid angle for intensity (bandSolidAngleSr), sin²θb − sin²θa for luminance relative to Lambertian.
 */
export function poolLeadingBins(values: number[], stdErrs: number[], weights: number[], bins: number): { value: number; stdErr: number } {
  let sw = 0, svw = 0, sew = 0
  for (let i = 0; i < Math.min(bins, values.length); i++) {
    const w = weights[i]!
    sw += w
    svw += values[i]! * w
    sew += (stdErrs[i]! * w) ** 2
  }
  return sw > 0 ? { value: svw / sw, stdErr: Math.sqrt(sew) / sw } : { value: 0, stdErr: 0 }
}

/** Bins (1° each) pooled into one near-axis value on the polar and luminance charts. */
export const NEAR_AXIS_POOL_DEG = 5
