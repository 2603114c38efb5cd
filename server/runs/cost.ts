// Cost of a run before it is queued: a short pilot trace (fixed rays of the run's own seed, in-process, under the
// same per-ray and per-batch event limits the worker applies) estimates encounters per ray. A geometry whose
// batches would run out of their event budget is refused; one that would use a good part of it, or whose pilot
// rays already hit maxEvents, is accepted with a warning kept on the run.
import { prepareRun, traceChunk, T_EVENTS, T_RAYS, T_UNRESOLVED } from '../../shared/optics'
import type { Scenario } from '../../shared/types/scenario'
import { thinFilmPeakNm } from '../../shared/optics/thinfilm/result'

export const PILOT_RAYS = 256
/** Sweeps: at most this many cells are piloted (evenly spread over the grid, first and last included). */
export const PILOT_CELLS = 16
/** Estimated cost above this share of the batch budget earns a warning. */
export const WARN_SHARE = 0.25

export interface CellCost {
  cellIndex: number
  /** Estimated encounters per ray of the costlier stream, device or companion (a lower bound when exhausted). */
  eventsPerRay: number
  /** Pilot rays (device stream) that ended unresolved. */
  unresolved: number
  /** The pilot itself ran out of its budget: the estimate is a lower bound and over the limit. */
  exhausted: boolean
}

export interface CostVerdict {
  refuse: string | null
  warnings: string[]
  worst: CellCost | null
}

/** Which of `n` cells the pilot traces. */
export function pilotCells(n: number, max = PILOT_CELLS): number[] {
  if (n <= max) return Array.from({ length: n }, (_, i) => i)
  const out = new Set<number>()
  for (let k = 0; k < max; k++) out.add(Math.round((k * (n - 1)) / (max - 1)))
  return [...out]
}

/** Pilot trace of one scenario; `streamBudget` = encounters each stream may spend per ray on average in a batch. */
export function pilotCost(scenario: Scenario, seed: number, streamBudget: number, cellIndex = 0): CellCost {
  // An OLED stack with a spectrum is piloted at its peak wavelength alone: the encounters per ray hardly depend on
  // λ, and tabulating every wavelength node of up to 16 cells would hold the request for seconds.
  const pilot = scenario.emitter.thinFilm && scenario.emitter.spectrum
    ? { ...scenario, emitter: { ...scenario.emitter, spectrum: { wavelengthNm: thinFilmPeakNm(scenario) } } }
    : scenario
  const run = prepareRun(pilot)
  const budget = Math.ceil(PILOT_RAYS * streamBudget)
  const t = traceChunk(run, 0, PILOT_RAYS, seed, undefined, budget)
  const dev = t.device[T_EVENTS]!, pl = t.planar?.[T_EVENTS] ?? 0
  return {
    cellIndex,
    eventsPerRay: Math.max(dev, pl) / t.device[T_RAYS]!,
    unresolved: t.device[T_UNRESOLVED]!,
    exhausted: dev >= budget || pl >= budget,
  }
}

/**
 * Events each stream of a chunk of `count` rays may spend: its share of the run's batch budget (device and companion
 * halves). Fixed by the run's stored settings and the ray range, so the tally never depends on threads or timing.
 */
export function chunkEventBudget(batchEvents: number | null, batchRays: number, count: number): number {
  if (batchEvents === null) return Infinity
  return Math.ceil((batchEvents * count) / (2 * batchRays))
}

function fmt(n: number): string {
  return n >= 100 ? Math.round(n).toLocaleString('en-US').replace(/,/g, ' ') : String(Number(n.toPrecision(3)))
}

/**
 * Verdict for the cells of a run. `batchEvents` is the encounters a batch of `batchRays` rays may spend, half for
 * the device stream and half for the companion (as the worker splits it: chunkEventBudget).
 */
export function judgeCost(cells: Array<{ index: number; scenario: Scenario }>, seed: number, batchRays: number, batchEvents: number): CostVerdict {
  const perRay = batchEvents / (2 * batchRays)
  let worst: CellCost | null = null
  let worstUnresolved: CellCost | null = null
  for (const i of pilotCells(cells.length)) {
    const c = cells[i]!
    const cost = pilotCost(c.scenario, seed, perRay, c.index)
    if (!worst || cost.eventsPerRay > worst.eventsPerRay || cost.exhausted) worst = cost
    if (cost.unresolved > 0 && (!worstUnresolved || cost.unresolved > worstUnresolved.unresolved)) worstUnresolved = cost
    if (cost.exhausted) break
  }
  const where = (c: CellCost) => (cells.length > 1 ? ` (cell ${c.cellIndex})` : '')
  const warnings: string[] = []
  if (worst && (worst.exhausted || worst.eventsPerRay > perRay)) {
    return {
      refuse: `This geometry is too costly to trace${where(worst)}: a pilot of ${PILOT_RAYS} rays took ` +
        `${worst.exhausted ? 'more than ' : 'about '}${fmt(worst.eventsPerRay)} interface and reflector encounters per ray, ` +
        `and a batch allows ${fmt(perRay)} per ray, so most rays would end unresolved. Light is circulating almost ` +
        'without loss: lower the reflectance or maxEvents, add absorption, or use lenses with more sag.',
      warnings,
      worst,
    }
  }
  if (worst && worst.eventsPerRay > WARN_SHARE * perRay) {
    warnings.push(`Costly geometry${where(worst)}: about ${fmt(worst.eventsPerRay)} encounters per ray in a pilot of ` +
      `${PILOT_RAYS} rays (a batch allows ${fmt(perRay)}); tracing will be slow, and rays past a batch's budget are ` +
      'counted unresolved.')
  }
  if (worstUnresolved) {
    warnings.push(`${worstUnresolved.unresolved} of ${PILOT_RAYS} pilot rays${where(worstUnresolved)} ended unresolved ` +
      '(more than maxEvents encounters): expect an unresolved share of that order.')
  }
  return { refuse: null, warnings, worst }
}
