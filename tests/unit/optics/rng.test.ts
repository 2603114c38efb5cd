// Random streams: determinism per (seed, stream, ray), independence of neighbouring rays, uniformity.
// Statistical checks fix their seeds (named in the test) and use 5σ bands (false-alarm 5.7e-7, normal tail, Abramowitz & Stegun §26.2; from memory).
import { describe, expect, it } from 'vitest'
import { createRngState, fillUniforms, mix32, nextUint32, nextUniform, seedRay } from '../../../shared/optics/rng'

function draws(seed: number, stream: number, ray: number, n: number): number[] {
  const st = createRngState()
  seedRay(st, seed, stream, ray)
  const out: number[] = []
  for (let i = 0; i < n; i++) out.push(nextUniform(st))
  return out
}

describe('rng', () => {
  it('replays a ray from (seed, stream, index) alone, whatever came before', () => {
    const st = createRngState()
    seedRay(st, 5, 0, 123)
    for (let i = 0; i < 1000; i++) nextUint32(st)
    expect(draws(5, 0, 123, 8)).toEqual(draws(5, 0, 123, 8))
    expect(draws(5, 0, 2 ** 40 + 7, 4)).toEqual(draws(5, 0, 2 ** 40 + 7, 4))
  })
  it('fillUniforms gives the same numbers in the same order as nextUniform (the tracer reads blocks of them)', () => {
    const st = createRngState(), block = new Float64Array(8), got: number[] = []
    seedRay(st, 9, 1, 77)
    for (let k = 0; k < 3; k++) { fillUniforms(st, block); got.push(...block) }
    expect(got).toEqual(draws(9, 1, 77, 24))
  })
  it('different seeds, streams, indices (also above 2^32) give different streams', () => {
    const a = draws(5, 0, 123, 4)
    expect(draws(6, 0, 123, 4)).not.toEqual(a)
    expect(draws(5, 1, 123, 4)).not.toEqual(a)
    expect(draws(5, 0, 124, 4)).not.toEqual(a)
    expect(draws(5, 0, 123 + 2 ** 32, 4)).not.toEqual(a)
  })
  it('mix32 is a bijection on a sample of words (no collisions among 2^16 consecutive inputs)', () => {
    const seen = new Set<number>()
    for (let i = 0; i < 65536; i++) seen.add(mix32(i * 65537))
    expect(seen.size).toBe(65536)
  })
  it('uniforms lie in (0, 1); mean 1/2 and variance 1/12 within 5σ (seed 77, 200 000 draws over 20 000 rays)', () => {
    const st = createRngState()
    let n = 0, sum = 0, sum2 = 0, min = 1, max = 0
    for (let r = 0; r < 20000; r++) {
      seedRay(st, 77, 0, r)
      for (let i = 0; i < 10; i++) {
        const u = nextUniform(st)
        n++; sum += u; sum2 += u * u
        if (u < min) min = u
        if (u > max) max = u
      }
    }
    expect(min).toBeGreaterThan(0)
    expect(max).toBeLessThan(1)
    const mean = sum / n
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n))
    // var of u² is 1/5 − 1/9 = 4/45
    expect(Math.abs(sum2 / n - 1 / 3)).toBeLessThan(5 * Math.sqrt(4 / 45 / n))
  })
  it('first draws of consecutive rays are uncorrelated: lag-1 correlation within 5σ of 0 (seed 78, 100 000 rays)', () => {
    const N = 100000
    let prev = draws(78, 0, 0, 1)[0]!, s = 0
    for (let r = 1; r < N; r++) {
      const u = draws(78, 0, r, 1)[0]!
      s += (u - 0.5) * (prev - 0.5)
      prev = u
    }
    // each term has variance (1/12)²
    expect(Math.abs(s / (N - 1))).toBeLessThan((5 * (1 / 12)) / Math.sqrt(N - 1))
  })
  it('chi-square of 64 bins of the first draw over rays (seed 79, 128 000 rays) is below dof + 5√(2 dof)', () => {
    const bins = new Array(64).fill(0)
    const N = 128000
    for (let r = 0; r < N; r++) bins[Math.floor(draws(79, 0, r, 1)[0]! * 64)]++
    const e = N / 64
    const chi2 = bins.reduce((a, c) => a + (c - e) ** 2 / e, 0)
    expect(chi2).toBeLessThan(63 + 5 * Math.sqrt(2 * 63))
  })
})
