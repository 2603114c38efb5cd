// The run plan as a pure function: the grid, each cell's seed and batches, the rays held against the team's limit,
// the default name and the precision rule. References: σ of a binomial fraction is √(p(1−p)/N), so the rays for a
// target σ* scale as N·(σ/σ*)² (any Monte Carlo text, e.g. Kalos & Whitlock, Monte Carlo Methods, ch. 2); the
// densest hexagonal packing of discs covers π/(2√3) ≈ 0.9069 of the plane (closed form).
import { describe, expect, it } from 'vitest'
import { scenarioSchema } from '../../shared/types/scenario'
import { cellSeed } from '../../shared/types/sweep'
import { traceScenario } from '../../shared/optics'
import { bestCellIndex, cellSummaryOf, cellSummarySchema, figureUnavailable, FIGURES, FIGURE_KEYS, figureOf, type CellSummary } from '../../shared/types/figures'
import { defaultRunName, runPatchSchema } from '../../shared/types/run'
import { MIN_ROUND_RAYS, nextRound, planBatches, planRun, RunRequestError, tracedRaysPerRay } from '../../server/runs/plan'

const base = scenarioSchema.parse({
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 100000, seed: 7, fresnel: 'averaged' },
})
const planar = { ...base, lensArray: null }
const pixel = scenarioSchema.parse({ ...base, emitter: { ...base.emitter, source: { shape: 'disc', radiusUm: 50 } } })
const at = new Date('2026-12-02T15:40:00Z')
const AXES = [
  { parameter: 'lensArray.sagUm' as const, values: [2, 3] },
  { parameter: 'lensArray.fillFactor' as const, values: [0.6, 0.95] },
]

describe('batches', () => {
  it('cut a ray range into contiguous batches of at most batchRays, numbered from firstIndex', () => {
    expect(planBatches(0, 120_000, 50_000)).toEqual([
      { batchIndex: 0, firstRay: 0, rayCount: 50_000 },
      { batchIndex: 1, firstRay: 50_000, rayCount: 50_000 },
      { batchIndex: 2, firstRay: 100_000, rayCount: 20_000 },
    ])
    const later = planBatches(200_000, 70_001, 35_000, 4)
    expect(later.map((b) => b.batchIndex)).toEqual([4, 5, 6])
    expect(later.reduce((n, b) => n + b.rayCount, 0)).toBe(70_001)
    for (let i = 1; i < later.length; i++) expect(later[i]!.firstRay).toBe(later[i - 1]!.firstRay + later[i - 1]!.rayCount)
    expect(planBatches(0, 0, 1000)).toEqual([])
  })
})

describe('ray accounting', () => {
  it('an extended source gets its planar companion by quadrature (no rays); a pixel source traces it beside each ray; a planar design is its own companion', () => {
    expect(tracedRaysPerRay(base)).toBe(1)
    expect(tracedRaysPerRay(pixel)).toBe(2)
    expect(tracedRaysPerRay(planar)).toBe(1)
  })
})

describe('planRun', () => {
  it('a single run uses the seed itself and the design\'s ray count; the team is charged the rays traced (device, and a traced companion)', () => {
    const p = planRun({ kind: 'single', base, designName: 'Film A', batchRays: 40_000, at })
    expect(p.seed).toBe(7)
    expect(p.cells).toHaveLength(1)
    expect(p.cells[0]!.seed).toBe(7)
    expect(p.raysPerCell).toBe(100_000)
    expect(p.cells[0]!.batches.map((b) => b.rayCount)).toEqual([40_000, 40_000, 20_000])
    expect(p.raysPlanned).toBe(100_000)
    expect(p.tracedRaysPlanned).toBe(100_000)
    expect(p.tracedRaysReserved).toBe(100_000)
    const px = planRun({ kind: 'single', base: pixel, designName: 'Pixel', batchRays: 40_000, at })
    expect(px.raysPlanned).toBe(100_000)
    expect(px.tracedRaysReserved).toBe(200_000)
    expect(p.name).toBe('Film A, 2 Dec 15:40 UTC')
    const flat = planRun({ kind: 'single', base: planar, designName: 'Flat', batchRays: 40_000, at, seed: 3, precision: { rays: 5000 } })
    expect(flat.cells[0]!.seed).toBe(3)
    expect(flat.tracedRaysReserved).toBe(5000)
  })

  it('a sweep gets one cell per grid point, cellSeed seeds, and no rays for a cell whose fill factor is above π/(2√3)', () => {
    const p = planRun({ kind: 'sweep', base, designName: 'Film A', axes: AXES, seed: 4242, precision: { rays: 120_000 }, batchRays: 50_000, at })
    expect(p.cells.map((c) => c.coordinates)).toEqual([[2, 0.6], [2, 0.95], [3, 0.6], [3, 0.95]])
    expect(p.cells.map((c) => c.seed)).toEqual([0, 1, 2, 3].map((i) => cellSeed(4242, i)))
    expect(p.cells.map((c) => c.scenario === null)).toEqual([false, true, false, true])
    expect(p.cells[1]!.infeasibleReason).toMatch(/fill factor 0.95 is above the hexagonal maximum/)
    expect(p.cells[1]!.batches).toEqual([])
    expect(p.cells[1]!.raysPlanned).toBe(0)
    expect(p.infeasibleCount).toBe(2)
    expect(p.feasible.map((c) => c.index)).toEqual([0, 2])
    expect(p.raysPlanned).toBe(240_000)
    expect(p.tracedRaysReserved).toBe(2 * 120_000)
    expect(p.figure).toBe('enhancement')
    expect(p.name).toBe('Sag × Fill factor, 2 Dec 15:40 UTC')
  })

  it('with a target σ the first round is one batch (or the cap), and the team is charged the whole cap', () => {
    const p = planRun({ kind: 'sweep', base, designName: 'A', axes: [AXES[0]!], precision: { targetStdErr: 0.001, rayCap: 400_000 }, batchRays: 50_000, at })
    expect(p.firstRound).toBe(50_000)
    expect(p.raysPerCell).toBeNull()
    expect(p.rayCap).toBe(400_000)
    expect(p.tracedRaysPlanned).toBe(2 * 50_000)
    expect(p.tracedRaysReserved).toBe(2 * 400_000)
    const small = planRun({ kind: 'single', base, designName: 'A', precision: { targetStdErr: 0.001, rayCap: 20_000 }, batchRays: 50_000, at })
    expect(small.firstRound).toBe(20_000)
  })

  it('refuses a figure the design cannot produce, and a grid with no buildable cell, in the trade\'s words', () => {
    const pixel = () => planRun({ kind: 'sweep', base, designName: 'A', axes: [AXES[0]!], figure: 'pixelOnAxisGain', batchRays: 50_000, at })
    expect(pixel).toThrow(RunRequestError)
    expect(pixel).toThrow(/on-axis gain over the pixel needs a disc or rectangle source/)
    expect(() => planRun({ kind: 'sweep', base, designName: 'A', axes: [AXES[0]!], figure: 'maxDeltaUvTo60', batchRays: 50_000, at }))
      .toThrow(/needs an emission spectrum/)
    try {
      planRun({ kind: 'sweep', base, designName: 'A', axes: [{ parameter: 'lensArray.fillFactor', values: [0.95, 0.99] }], batchRays: 50_000, at })
      expect.unreachable()
    } catch (err) {
      expect(err).toBeInstanceOf(RunRequestError)
      expect((err as RunRequestError).statusCode).toBe(400)
      expect((err as RunRequestError).message).toMatch(/^No cell of this sweep can be built: cell 0 \(0.95\)/)
      expect((err as RunRequestError).details).toHaveLength(2)
    }
  })

  it('keeps a given name as it is', () => {
    expect(planRun({ kind: 'single', base, designName: 'A', name: 'Warm stack, check', batchRays: 50_000, at }).name).toBe('Warm stack, check')
  })
})

describe('the precision rule', () => {
  it('a fixed count is done when its rays are traced', () => {
    expect(nextRound({ raysDone: 1000, stdErr: 1, targetStdErr: null, rayCap: null })).toEqual({ done: true, stopReason: 'rays' })
  })

  it('stops at the target, or at the cap when the target is out of reach', () => {
    expect(nextRound({ raysDone: 50_000, stdErr: 0.0019, targetStdErr: 0.002, rayCap: 400_000 })).toEqual({ done: true, stopReason: 'target' })
    expect(nextRound({ raysDone: 400_000, stdErr: 0.003, targetStdErr: 0.002, rayCap: 400_000 })).toEqual({ done: true, stopReason: 'cap' })
  })

  it('asks for N(σ/σ*)² rays (5 % over): a binomial fraction then meets the target — seed-free, closed form', () => {
    const p = 0.5, n = 50_000
    const sigma = Math.sqrt((p * (1 - p)) / n)
    const target = 0.001
    const v = nextRound({ raysDone: n, stdErr: sigma, targetStdErr: target, rayCap: 10_000_000 })
    expect(v.done).toBe(false)
    if (v.done) return
    expect(v.addRays).toBe(Math.ceil(n * (sigma / target) ** 2 * 1.05) - n)
    const total = n + v.addRays
    expect(Math.sqrt((p * (1 - p)) / total)).toBeLessThan(target)
    // without the 5 % margin the same total would only just reach it
    expect(total).toBeGreaterThan((p * (1 - p)) / target ** 2)
  })

  it('never adds fewer than MIN_ROUND_RAYS, and never passes the cap', () => {
    const tiny = nextRound({ raysDone: 10_000, stdErr: 0.0010001, targetStdErr: 0.001, rayCap: 1_000_000 })
    expect(tiny).toEqual({ done: false, addRays: MIN_ROUND_RAYS })
    const nearCap = nextRound({ raysDone: 49_500, stdErr: 0.01, targetStdErr: 0.001, rayCap: 50_000 })
    expect(nearCap).toEqual({ done: false, addRays: 500 })
    const big = nextRound({ raysDone: 50_000, stdErr: 0.01, targetStdErr: 0.001, rayCap: 400_000 })
    expect(big).toEqual({ done: false, addRays: 350_000 })
  })
})

describe('names', () => {
  it('default from the axes and the time, in a given zone or in UTC said so', () => {
    expect(defaultRunName({ kind: 'sweep', designName: 'A', axisLabels: ['Sag', 'Fill factor'], at })).toBe('Sag × Fill factor, 2 Dec 15:40 UTC')
    expect(defaultRunName({ kind: 'sweep', designName: 'A', axisLabels: ['Sag'], at, timeZone: 'Europe/Berlin' })).toBe('Sag, 2 Dec 16:40')
    expect(defaultRunName({ kind: 'single', designName: 'Film A', axisLabels: [], at })).toBe('Film A, 2 Dec 15:40 UTC')
    const long = defaultRunName({ kind: 'single', designName: 'x'.repeat(200), axisLabels: [], at })
    expect(long.length).toBeLessThanOrEqual(120)
    expect(long.endsWith('2 Dec 15:40 UTC')).toBe(true)
  })

  it('a rename is 1–120 characters after trimming, without bidi controls', () => {
    expect(runPatchSchema.parse({ name: '  Warm\u202E stack  ' })).toEqual({ name: 'Warm stack' })
    expect(runPatchSchema.safeParse({ name: '   ' }).success).toBe(false)
    expect(runPatchSchema.safeParse({ name: 'x'.repeat(121) }).success).toBe(false)
    expect(runPatchSchema.safeParse({ name: 'ok', figure: 'extraction' }).success).toBe(false)
  })
})

describe('figures', () => {
  const summary = (over: Partial<CellSummary>): CellSummary => ({
    rays: 1000, extraction: 0.3, extractionStdErr: 0.01, enhancement: 1.2, enhancementStdErr: 0.02, planarExtraction: 0.25,
    planarExtractionStdErr: 0.01, onAxisLuminance: 1, onAxisLuminanceStdErr: 0.05, halfLuminanceAngleDeg: 60,
    losses: {}, lossesStdErr: {}, ...over,
  })

  it('every figure reads a value with its σ from a summary that has it, and null from one that does not', () => {
    const full = summary({
      pixelOnAxisGain: 0.45, pixelOnAxisGainStdErr: 0.01, maxDeltaUvTo60: 0.004, maxDeltaUvTo60StdErr: 0.0005,
      photopicOnAxisGain: 1.1, photopicOnAxisGainStdErr: 0.03, measuredGain: 1.15, measuredGainStdErr: 0.02, edgeLoss: 0.04, edgeLossStdErr: 0.001,
    })
    for (const k of FIGURE_KEYS) {
      const f = figureOf(full, k)
      expect(f, k).not.toBeNull()
      expect(f!.stdErr, k).toBeGreaterThan(0)
    }
    expect(figureOf(summary({}), 'pixelOnAxisGain')).toBeNull()
    expect(figureOf(summary({}), 'edgeLoss')).toBeNull()
    expect(figureOf(summary({ maxDeltaUvTo60: null }), 'maxDeltaUvTo60')).toBeNull()
    expect(figureOf(null, 'enhancement')).toBeNull()
  })

  it('the best cell follows the figure\'s direction: highest gain, lowest colour shift; unfinished cells do not count', () => {
    const cells = [
      { cellIndex: 0, status: 'done', summary: summary({ enhancement: 1.3, maxDeltaUvTo60: 0.006 }) },
      { cellIndex: 1, status: 'done', summary: summary({ enhancement: 1.1, maxDeltaUvTo60: 0.002 }) },
      { cellIndex: 2, status: 'running', summary: summary({ enhancement: 9, maxDeltaUvTo60: 0 }) },
      { cellIndex: 3, status: 'infeasible', summary: null },
    ]
    expect(FIGURES.maxDeltaUvTo60.better).toBe('lower')
    expect(bestCellIndex(cells, 'enhancement')).toBe(0)
    expect(bestCellIndex(cells, 'maxDeltaUvTo60')).toBe(1)
    expect(bestCellIndex(cells.slice(2), 'enhancement')).toBeNull()
  })

  it('a stored summary of a traced result parses as CellSummary and reads back the result\'s own figures — seed 11', () => {
    const disc = { ...base, emitter: { ...base.emitter, source: { shape: 'disc' as const, radiusUm: 40 } } }
    for (const sc of [base, disc]) {
      const r = traceScenario(sc, { rays: 4000, seed: 11 })
      expect(r.pixel === null).toBe(sc === base)
      const s = cellSummaryOf(r)
      expect(cellSummarySchema.parse(s)).toEqual(s)
      expect(figureOf(s, 'enhancement')).toEqual({ value: r.enhancement, stdErr: r.enhancementStdErr })
      expect(figureOf(s, 'extraction')).toEqual({ value: r.extraction, stdErr: r.extractionStdErr })
      expect(figureOf(s, 'onAxisLuminance')).toEqual({ value: r.luminance.onAxisRelative, stdErr: r.luminance.onAxisRelativeStdErr })
      expect(figureOf(s, 'pixelOnAxisGain')).toEqual(r.pixel ? { value: r.pixel.onAxisEnhancement, stdErr: r.pixel.onAxisEnhancementStdErr } : null)
    }
  })

  it('says what a design lacks for a figure', () => {
    expect(figureUnavailable('enhancement', base)).toBeNull()
    expect(figureUnavailable('pixelOnAxisGain', { emitter: { ...base.emitter, source: { shape: 'disc', radiusUm: 50 } } })).toBeNull()
    expect(figureUnavailable('photopicOnAxisGain', base)).toMatch(/needs an emission spectrum/)
    expect(figureUnavailable('measuredGain', base)).toMatch(/needs a finite panel/)
    expect(figureUnavailable('edgeLoss', { ...base, panel: { widthMm: 10, heightMm: 10 } })).toBeNull()
  })
})
