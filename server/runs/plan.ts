// A run's plan, as pure functions (no database, no clock, no randomness): the grid of cells, the seed of each,
// the first round of rays and its batches, the rays held against the team's limit, the default name, and the
// precision rule that decides, when a cell's last batch lands, whether it is done or gets another round.
import { tracedPerRay } from '../../shared/types/ray-limits'
import type { Scenario } from '../../shared/types/scenario'
import { AXIS_PARAMETERS, axisProblems, cellSeed, expandSweep, type SweepAxis, type SweepCell } from '../../shared/types/sweep'
import { DEFAULT_FIGURE, figureUnavailable, type Figure } from '../../shared/types/figures'
import { defaultRunName } from '../../shared/types/run'

/** A request the user can fix: the route turns it into a 400 (or 422/429) with this message. */
export class RunRequestError extends Error {
  constructor(message: string, readonly statusCode = 400, readonly details: string[] = []) {
    super(message)
  }
}

/**
 * Rays the engine traces for each of the user's rays: the device, plus its planar companion (the same stack without
 * lenses) when the design has a lens film and the companion cannot be had by quadrature (shared/optics/run.ts
 * tracesCompanion). The one place that converts between the user's rays and traced rays (the unit of the team's
 * ray limit and of runs.rays_planned / rays_done).
 */
export function tracedRaysPerRay(scenario: Scenario): number {
  return tracedPerRay(scenario)
}

export interface PlannedBatch { batchIndex: number; firstRay: number; rayCount: number }

/** Splits rays [firstRay, firstRay + rays) into batches of at most batchRays, numbered from firstIndex. */
export function planBatches(firstRay: number, rays: number, batchRays: number, firstIndex = 0): PlannedBatch[] {
  const out: PlannedBatch[] = []
  let i = firstIndex
  for (let r = firstRay; r < firstRay + rays; r += batchRays, i++) {
    out.push({ batchIndex: i, firstRay: r, rayCount: Math.min(batchRays, firstRay + rays - r) })
  }
  return out
}

export interface PrecisionInput { rays?: number; targetStdErr?: number; rayCap?: number }

export interface RunPlanInput {
  kind: 'single' | 'sweep'
  base: Scenario
  designName: string
  axes?: SweepAxis[]
  figure?: Figure
  name?: string
  seed?: number
  precision?: PrecisionInput
  batchRays: number
  /** When the run is created (for its default name). */
  at: Date
}

export interface CellPlan {
  index: number
  coordinates: number[]
  scenario: Scenario | null
  infeasibleReason: string | null
  seed: number
  /** The user's rays of the first round (0 for an infeasible cell). */
  raysPlanned: number
  batches: PlannedBatch[]
}

export interface RunPlan {
  name: string
  axes: SweepAxis[]
  figure: Figure
  seed: number
  raysPerCell: number | null
  targetStdErr: number | null
  rayCap: number | null
  /** The user's rays each feasible cell traces first: the whole count, or (with a target) one batch to measure σ. */
  firstRound: number
  cells: CellPlan[]
  /** Scenarios of the feasible cells, for the pilot trace. */
  feasible: Array<{ index: number; scenario: Scenario }>
  /** Traced rays the run holds against the team's limit (a precision run its whole cap). */
  tracedRaysReserved: number
  /** Traced rays of the first round. */
  tracedRaysPlanned: number
  /** The user's rays of the first round, over all cells. */
  raysPlanned: number
  infeasibleCount: number
}

/** Everything a run will store, or a RunRequestError saying what to fix. */
export function planRun(input: RunPlanInput): RunPlan {
  const { base } = input
  const axes = input.kind === 'sweep' ? (input.axes ?? []) : []
  const figure = input.figure ?? DEFAULT_FIGURE
  if (input.kind === 'sweep') {
    const problems = axisProblems(base, axes)
    const unavailable = figureUnavailable(figure, base)
    if (unavailable) problems.push(unavailable)
    if (problems.length) throw new RunRequestError(problems.join('; '), 400, problems)
  }
  const seed = input.seed ?? base.trace.seed
  const grid: SweepCell[] = input.kind === 'sweep'
    ? expandSweep(base, axes)
    : [{ index: 0, coordinates: [], feasible: true, scenario: base }]
  const feasible = grid.filter((c): c is Extract<SweepCell, { feasible: true }> => c.feasible)
  if (feasible.length === 0) {
    const reasons = grid.map((c) => (c.feasible ? '' : `cell ${c.index} (${c.coordinates.join(', ')}): ${c.reason}`))
    throw new RunRequestError(`No cell of this sweep can be built: ${reasons[0]}`, 400, reasons)
  }
  const p = input.precision ?? {}
  const targetStdErr = p.targetStdErr ?? null
  const rayCap = targetStdErr !== null ? (p.rayCap ?? null) : null
  if (targetStdErr !== null && rayCap === null) throw new RunRequestError('precision.rayCap is required with targetStdErr', 400)
  const raysPerCell = targetStdErr === null ? (p.rays ?? base.trace.rays) : null
  const firstRound = raysPerCell ?? Math.min(input.batchRays, rayCap!)
  const cells: CellPlan[] = grid.map((c) => ({
    index: c.index,
    coordinates: c.coordinates,
    scenario: c.feasible ? c.scenario : null,
    infeasibleReason: c.feasible ? null : c.reason,
    // A single run uses the seed itself, so it reproduces `npm run simulate` with the same seed.
    seed: input.kind === 'single' ? seed : cellSeed(seed, c.index),
    raysPlanned: c.feasible ? firstRound : 0,
    batches: c.feasible ? planBatches(0, firstRound, input.batchRays) : [],
  }))
  const traced = (rays: number) => feasible.reduce((n, c) => n + rays * tracedRaysPerRay(c.scenario), 0)
  const name = input.name ?? defaultRunName({
    kind: input.kind, designName: input.designName, at: input.at,
    axisLabels: axes.map((a) => AXIS_PARAMETERS[a.parameter].label),
  })
  return {
    name, axes, figure, seed, raysPerCell, targetStdErr, rayCap, firstRound, cells,
    feasible: feasible.map((c) => ({ index: c.index, scenario: c.scenario })),
    tracedRaysReserved: traced(raysPerCell ?? rayCap!),
    tracedRaysPlanned: traced(firstRound),
    raysPlanned: firstRound * feasible.length,
    infeasibleCount: grid.length - feasible.length,
  }
}

export type RoundVerdict =
  | { done: true; stopReason: 'rays' | 'target' | 'cap' }
  | { done: false; addRays: number }

/** Fewest rays a further round adds (a round shorter than this is mostly overhead). */
export const MIN_ROUND_RAYS = 1000

/**
 * The precision rule, once a cell's planned rays are all traced. A fixed count is done ('rays'). With a target
 * standard error σ* on the extraction: done when σ ≤ σ* ('target') or the cap is reached ('cap'); else another
 * round of the rays needed, which scale as (σ/σ*)² (5 % over, so the next round usually ends it), at least
 * MIN_ROUND_RAYS and never past the cap.
 */
export function nextRound(input: { raysDone: number; stdErr: number; targetStdErr: number | null; rayCap: number | null }): RoundVerdict {
  const { raysDone, stdErr, targetStdErr, rayCap } = input
  if (targetStdErr === null || rayCap === null) return { done: true, stopReason: 'rays' }
  if (stdErr <= targetStdErr) return { done: true, stopReason: 'target' }
  if (raysDone >= rayCap) return { done: true, stopReason: 'cap' }
  const need = Number.isFinite(stdErr) ? Math.ceil(raysDone * (stdErr / targetStdErr) ** 2 * 1.05) - raysDone : rayCap - raysDone
  return { done: false, addRays: Math.min(rayCap - raysDone, Math.max(MIN_ROUND_RAYS, need)) }
}
