// Small derived numbers for result displays (pure; unit-tested).

/** Binomial standard error √(p(1−p)/N) (the binomial variance p(1−p)/N of a proportion: 4.0e-4 at p = 0.2, N = 10⁶). */
export function binomialStdErr(p: number, n: number): number {
  return n > 0 ? Math.sqrt(Math.max(0, p * (1 - p)) / n) : 0
}
