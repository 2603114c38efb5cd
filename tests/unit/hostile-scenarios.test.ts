// Hostile input against validation and the engine (fast-check, fixed seeds): every generated scenario either is
// refused with messages that name the field, or traces to completion with fractions that sum to 1 — no throw, no
// NaN, no hang (the event cap ends every ray; a per-chunk stop callback bounds wall time).
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { createTally, prepareRun, summarize, traceChunk } from '../../shared/optics'
import { parseScenario } from '../../shared/types/scenario'
import { sweepRequestSchema } from '../../shared/types/sweep'

const num = fc.oneof(
  fc.double({ noNaN: false }),
  fc.double({ min: -10, max: 10, noNaN: true }),
  fc.double({ min: 1e-6, max: 1e6, noNaN: true }),
  fc.integer({ min: -5, max: 1e7 }),
  fc.constantFrom(0, 1, 1.5, 1.7, 2, 5, 10, 100, 1e-9, 1e9, Number.MAX_VALUE, -0, Infinity, -Infinity),
)
const junk = fc.oneof(num, fc.string({ maxLength: 6 }), fc.constant(null), fc.boolean(), fc.constant(undefined), fc.array(num, { maxLength: 3 }))
// A field is usually plausible (so scenarios often pass and reach the engine) and sometimes anything at all.
const maybe = <T>(a: fc.Arbitrary<T>) => fc.oneof({ weight: 7, arbitrary: a }, { weight: 1, arbitrary: junk })
/** Log-uniform in [lo, hi]: spans the extremes the schema allows (tiny pitch under a thick substrate, etc.). */
const logU = (lo: number, hi: number) => fc.double({ min: 0, max: 1, noNaN: true }).map((u) => lo * (hi / lo) ** u)
const frac = fc.double({ min: 0, max: 1, noNaN: true })

const lensArb = fc.record({
  lattice: fc.constantFrom('hexagonal', 'square'), pitchUm: logU(1e-3, 1e4), dFrac: logU(0.02, 1), hFrac: logU(1e-3, 1),
  shape: fc.constantFrom('spherical', 'parabolic', 'conic'), conicConstant: fc.double({ min: -5, max: 3, noNaN: true }),
  index: fc.double({ min: 1, max: 3, noNaN: true }),
}).map((l) => ({
  lattice: l.lattice, pitchUm: l.pitchUm, diameterUm: l.pitchUm * l.dFrac, sagUm: (l.pitchUm * l.dFrac / 2) * l.hFrac,
  shape: l.shape, conicConstant: l.conicConstant, index: l.index,
}))

const scenarioArb = fc.record({
  emitter: maybe(fc.record({
    index: maybe(fc.double({ min: 1, max: 3, noNaN: true })),
    angularProfile: maybe(fc.oneof(
      fc.constantFrom('isotropic', 'lambertian', 'laser'),
      fc.record({ table: fc.array(fc.tuple(fc.double({ min: -10, max: 200, noNaN: true }), fc.double({ min: -1, max: 10, noNaN: true })), { maxLength: 6 }) }),
      fc.constant({ table: [[0, 1], [30, 0.8], [60, 0.3], [90, 0]] }),
    )),
    source: maybe(fc.oneof(
      fc.constant({ shape: 'extended' }),
      fc.record({ shape: fc.constant('disc'), radiusUm: maybe(logU(1e-3, 1e5)) }),
      fc.record({ shape: fc.constant('rectangle'), widthUm: maybe(logU(1e-3, 1e5)), heightUm: maybe(logU(1e-3, 1e5)) }),
      fc.record({ shape: fc.constant('star') }),
    )),
  }, { requiredKeys: ['index'] })),
  reflector: maybe(fc.record({ reflectance: maybe(frac), diffuseFraction: maybe(frac) }, { requiredKeys: ['reflectance'] })),
  substrate: maybe(fc.record({
    index: maybe(fc.double({ min: 1, max: 3, noNaN: true })), thicknessUm: maybe(logU(1e-2, 1e6)),
    absorptionPerMm: maybe(fc.oneof(fc.constant(0), logU(1e-4, 1e3))),
  }, { requiredKeys: ['index', 'thicknessUm'] })),
  lensArray: fc.oneof(fc.constant(null), maybe(lensArb), lensArb),
  trace: maybe(fc.record({ seed: maybe(fc.integer({ min: 0, max: 0xffffffff })), fresnel: maybe(fc.constantFrom('averaged', 'none', 'full')), maxEvents: maybe(fc.integer({ min: 1, max: 2000 })) }, { requiredKeys: [] })),
}, { requiredKeys: ['emitter', 'reflector', 'substrate', 'lensArray'] })

// Field paths a message may start with: a scenario path (dots, [i]) then a space or colon.
const NAMED = /^(scenario|[a-zA-Z]+(\.[a-zA-Z]+|\[\d+\])*)[ :]/

describe('hostile scenarios (fast-check seed 20261201, 600 cases)', () => {
  it('are refused with field-named messages, or trace to completion with fractions summing to 1', () => {
    let traced = 0
    let refused = 0
    fc.assert(fc.property(scenarioArb, (input) => {
      const r = parseScenario(input)
      if (!r.ok) {
        refused++
        expect(r.errors.length).toBeGreaterThan(0)
        for (const m of r.errors) expect(m).toMatch(NAMED)
        return
      }
      traced++
      const run = prepareRun(r.scenario)
      const started = Date.now()
      // Wall-clock cap: a chunk gives up after 5 s (never reached by a healthy engine on 300 rays).
      const t = traceChunk(run, 0, 300, r.scenario.trace.seed, () => Date.now() - started > 5000)
      expect(Date.now() - started).toBeLessThan(5000)
      const s = summarize(t, r.scenario.trace.seed)
      const sum = s.extraction + Object.values(s.losses).reduce((a, b) => a + b, 0)
      expect(s.rays).toBe(300)
      expect(Math.abs(sum - 1)).toBeLessThan(1e-12)
      for (const v of s.intensity.perSteradian) expect(Number.isFinite(v)).toBe(true)
      void createTally
    }), { seed: 20261201, numRuns: 600 })
    // The generator must exercise both paths, or the property says little.
    expect(traced).toBeGreaterThan(30)
    expect(refused).toBeGreaterThan(100)
  }, 120_000)
})

describe('hostile sweep bodies (fast-check seed 7, 300 cases)', () => {
  it('are refused with field-named issues or parse to at most 2 axes of at most 50 values', () => {
    const axis = fc.record({
      parameter: fc.constantFrom('lensArray.sagUm', 'lensArray.fillFactor', 'substrate.thicknessUm', 'lensArray.colour', 42),
      values: fc.option(fc.array(num, { maxLength: 60 }), { nil: undefined }),
      start: fc.option(num, { nil: undefined }), stop: fc.option(num, { nil: undefined }),
      steps: fc.option(fc.integer({ min: -3, max: 80 }), { nil: undefined }),
    }, { requiredKeys: [] })
    const body = fc.record({
      designId: fc.oneof(fc.uuid(), fc.string()), axes: fc.oneof(fc.array(axis, { maxLength: 3 }), junk),
      figure: fc.oneof(fc.constantFrom('extraction', 'enhancement', 'onAxisLuminance', 'beauty'), junk),
      precision: fc.oneof(fc.constant(undefined), fc.record({ rays: maybe(num), targetStdErr: maybe(num), rayCap: maybe(num) }, { requiredKeys: [] })),
    }, { requiredKeys: [] })
    fc.assert(fc.property(body, (b) => {
      const r = sweepRequestSchema.safeParse(b)
      if (!r.success) {
        for (const iss of r.error.issues) expect(iss.path.length + iss.message.length).toBeGreaterThan(0)
        return
      }
      expect(r.data.axes.length).toBeGreaterThanOrEqual(1)
      expect(r.data.axes.length).toBeLessThanOrEqual(2)
      for (const a of r.data.axes) expect((a.values?.length ?? a.steps)!).toBeLessThanOrEqual(50)
    }), { seed: 7, numRuns: 300 })
  })
})
