// Work limits of the tracer: the per-ray bound on maxEvents in the schema, the per-call event budget of traceRange
// (rays past it are counted unresolved, never dropped; the same ray stream gives the same counts), and the pilot
// verdict at run creation (a lossless near-flat cavity refused, an ordinary hex film accepted without warnings).
import { describe, expect, it } from 'vitest'
import { createTally, prepareRun, traceChunk, traceRange, T_EVENTS, T_EXTRACTED, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_TRAPPED, T_UNRESOLVED, T_WAVEGUIDED } from '../../shared/optics'
import { parseScenario, scenarioSchema } from '../../shared/types/scenario'
import { chunkEventBudget, judgeCost, pilotCells } from '../../server/runs/cost'

const hex = scenarioSchema.parse({
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 1000, seed: 3, fresnel: 'averaged' },
})
// Lossless mirror, n = 4 throughout, caps 0.001 µm high over a 1 000 µm pitch: nearly every ray is totally
// reflected at the top and circulates until its encounter limit.
const cavity = scenarioSchema.parse({
  emitter: { index: 4, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 1, diffuseFraction: 0 },
  substrate: { index: 4, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 1000, diameterUm: 1000, sagUm: 0.001, shape: 'spherical', index: 4 },
  trace: { rays: 1000, seed: 3, fresnel: 'averaged', maxEvents: 100_000 },
})

const ends = (t: Float64Array) => t[T_EXTRACTED]! + t[T_REFLECTOR]! + t[T_SUBSTRATE]! + t[T_WAVEGUIDED]! + t[T_TRAPPED]! + t[T_UNRESOLVED]!

describe('per-ray limit', () => {
  it('maxEvents above 100 000 is refused with the field named', () => {
    const r = parseScenario({ ...cavity, trace: { ...cavity.trace, maxEvents: 1e7 } })
    expect(r.ok).toBe(false)
    expect(JSON.stringify(r)).toMatch(/Event limit per ray must be at most 100000: got 10000000/)
    expect(scenarioSchema.safeParse({ ...cavity, trace: { ...cavity.trace, maxEvents: 100_000 } }).success).toBe(true)
  })
})

describe('event budget of one call', () => {
  it('bounds the encounters, counts every launched ray, and puts the cut rays in unresolved', () => {
    const scene = prepareRun(cavity).device
    const budget = 300_000
    const t = createTally()
    expect(traceRange(scene, 0, 200, 9, t, undefined, 0, budget)).toBe(200)
    expect(t[T_RAYS]).toBe(200)
    expect(ends(t)).toBe(200)
    // Each ray past the budget still counts the one encounter that found the budget spent.
    expect(t[T_EVENTS]!).toBeLessThanOrEqual(budget + 200)
    // Without the budget these 200 rays take about 1.9·10⁷ encounters (measured: ≈ 97 000 per ray).
    expect(t[T_UNRESOLVED]!).toBeGreaterThan(190)
  })

  it('the same rays, seed and budget give identical counts; an unspent budget changes nothing', () => {
    const run = prepareRun(hex, { companion: 'traced' }) // both streams under the budget
    const a = traceChunk(run, 1000, 5000, 4, undefined, 20_000)
    const b = traceChunk(run, 1000, 5000, 4, undefined, 20_000)
    expect(Array.from(a.device)).toEqual(Array.from(b.device))
    expect(Array.from(a.planar!)).toEqual(Array.from(b.planar!))
    const free = traceChunk(run, 1000, 5000, 4)
    const roomy = traceChunk(run, 1000, 5000, 4, undefined, 1e9)
    expect(Array.from(roomy.device)).toEqual(Array.from(free.device))
    // A tight budget moves rays to unresolved, it never loses them.
    expect(ends(a.device)).toBe(5000)
    expect(a.device[T_UNRESOLVED]!).toBeGreaterThan(free.device[T_UNRESOLVED]!)
  })

  it('a chunk gets its share of the batch budget per stream; runs from before the budget have none', () => {
    expect(chunkEventBudget(8e6, 50_000, 50_000)).toBe(4e6)
    expect(chunkEventBudget(8e6, 50_000, 25_000)).toBe(2e6)
    expect(chunkEventBudget(null, 50_000, 50_000)).toBe(Infinity)
  })
})

describe('pilot at creation', () => {
  // Production defaults: 200 000-ray batches, 1.2·10⁸ encounters each (300 per ray on each stream).
  it('refuses the lossless near-flat cavity in the trade\'s words', () => {
    const v = judgeCost([{ index: 0, scenario: cavity }], 1, 200_000, 1.2e8)
    expect(v.refuse).toMatch(/too costly to trace: a pilot of 256 rays took more than .* encounters per ray.*lower the reflectance/)
    expect(v.worst!.exhausted).toBe(true)
  })

  it('accepts an ordinary hex film without a warning (about 7.6 encounters per device ray, measured)', () => {
    const v = judgeCost([{ index: 0, scenario: hex }], 1, 200_000, 1.2e8)
    expect(v.refuse).toBeNull()
    expect(v.warnings).toEqual([])
    expect(v.worst!.eventsPerRay).toBeGreaterThan(2)
    expect(v.worst!.eventsPerRay).toBeLessThan(50)
  })

  it('warns when pilot rays already hit maxEvents', () => {
    const capped = { ...cavity, trace: { ...cavity.trace, maxEvents: 50 } }
    const v = judgeCost([{ index: 0, scenario: capped }], 1, 200_000, 1.2e8)
    expect(v.refuse).toBeNull()
    expect(v.warnings.join(' ')).toMatch(/of 256 pilot rays ended unresolved \(more than maxEvents encounters\)/)
  })

  it('pilots at most 16 cells of a big sweep, first and last included', () => {
    expect(pilotCells(5)).toEqual([0, 1, 2, 3, 4])
    const c = pilotCells(400)
    expect(c.length).toBe(16)
    expect(c[0]).toBe(0)
    expect(c.at(-1)).toBe(399)
  })
})
