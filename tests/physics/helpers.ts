// Shared helpers of the statistical tracer checks: scenario builders and k·σ assertions.
import { expect } from 'vitest'
import { scenarioSchema, type Scenario, type ScenarioInput } from '../../shared/types/scenario'
import { createTally, packScene, traceRange, type Tally, T_RAYS } from '../../shared/optics'

/** 5σ two-sided: false-alarm 5.7e-7 per check (normal tail, Abramowitz & Stegun, Handbook of Mathematical Functions, §26.2; from memory). */
export const K_SIGMA = 5

export function planarStack(over: Partial<{ nE: number; nS: number; rb: number; fd: number; fresnel: 'averaged' | 'none' | 'polarized'; profile: ScenarioInput['emitter']['angularProfile']; absorptionPerMm: number; thicknessUm: number }> = {}): Scenario {
  return scenarioSchema.parse({
    emitter: { index: over.nE ?? 1.7, angularProfile: over.profile ?? 'isotropic' },
    reflector: { reflectance: over.rb ?? 1, diffuseFraction: over.fd ?? 0 },
    substrate: { index: over.nS ?? 1.5, thicknessUm: over.thicknessUm ?? 100, absorptionPerMm: over.absorptionPerMm ?? 0 },
    lensArray: null,
    trace: { fresnel: over.fresnel ?? 'averaged' },
  })
}

export function traceScene(sc: Scenario, rays: number, seed: number, planar = false): Tally {
  const t = createTally()
  traceRange(packScene(sc, { planar }), 0, rays, seed, t)
  expect(t[T_RAYS]).toBe(rays)
  return t
}

/** Fraction of tally slot `slot` with its binomial σ. */
export function fraction(t: Tally, slot: number): { p: number; sigma: number } {
  const n = t[T_RAYS]!
  const p = t[slot]! / n
  return { p, sigma: Math.sqrt(Math.max(p * (1 - p), 1 / n) / n) }
}

/** |got − want| ≤ k·σ, with a readable message. */
export function expectWithinSigma(label: string, got: number, want: number, sigma: number, k = K_SIGMA): void {
  const z = (got - want) / sigma
  expect(Math.abs(z), `${label}: got ${got.toPrecision(6)}, want ${want.toPrecision(6)}, σ ${sigma.toPrecision(3)}, z ${z.toFixed(2)}`).toBeLessThanOrEqual(k)
}

/** Composite Gauss–Legendre (5 points) of f over [a, b] in m panels. */
export function integrate(f: (x: number) => number, a: number, b: number, m = 400): number {
  const xs = [0, -0.5384693101056831, 0.5384693101056831, -0.906179845938664, 0.906179845938664]
  const ws = [0.5688888888888889, 0.47862867049936647, 0.47862867049936647, 0.2369268850561891, 0.2369268850561891]
  let s = 0
  const h = (b - a) / m
  for (let i = 0; i < m; i++) {
    const c = a + (i + 0.5) * h
    for (let k = 0; k < 5; k++) s += ws[k]! * f(c + 0.5 * h * xs[k]!)
  }
  return 0.5 * h * s
}
