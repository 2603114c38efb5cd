// Small derived numbers for result displays (pure; unit-tested).

/** Binomial standard error √(p(1−p)/N) (CHECKS.md, statistics: 4.0e-4 at p = 0.2, N = 10⁶). */
export function binomialStdErr(p: number, n: number): number {
  return n > 0 ? Math.sqrt(Math.max(0, p * (1 - p)) / n) : 0
}

/**
 * Half-luminance angle and a first-order σ: the crossing of L(θ) = L(0)/2 interpolated between bin centres, its
 * σ from the luminance errors of the two bins and of the on-axis value divided by the local slope (delta method).
 * Null when the curve never falls to half.
 */
export function halfAngleWithErr(thetaDeg: number[], lum: number[], lumErr: number[], onAxis: number, onAxisErr: number): { value: number; stdErr: number } | null {
  const target = onAxis / 2
  for (let b = 1; b < lum.length; b++) {
    if (lum[b]! <= target && lum[b - 1]! > target) {
      const l0 = lum[b - 1]!, l1 = lum[b]!
      const step = thetaDeg[b]! - thetaDeg[b - 1]!
      const f = (l0 - target) / (l0 - l1)
      const slope = (l0 - l1) / step // per degree, > 0
      const s = Math.sqrt(((1 - f) * lumErr[b - 1]!) ** 2 + (f * lumErr[b]!) ** 2 + (onAxisErr / 2) ** 2)
      return { value: thetaDeg[b - 1]! + f * step, stdErr: s / slope }
    }
  }
  return null
}
