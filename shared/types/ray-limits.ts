// How many rays a run may ask for, counted in the rays the user types. A team's queue limit
// (LENSFIELD_TEAM_RAY_LIMIT, default 10⁹) counts traced rays. The planar companion (the same stack without lenses,
// the enhancement's reference) of an extended source is computed by quadrature and costs no rays; a finite pixel
// (disc or rectangle source) needs the companion's exit positions, so such a lens cell traces every requested ray
// twice: once through the film and once through the companion. A flat stack is its own companion. So the most a run can ask
// for per cell is (limit − traced rays the team already has waiting) / (traced rays per requested ray, summed over
// the run's buildable cells), and never more than MAX_RAYS_PER_CELL (the request schema's own bound). The form,
// the route's 429 and the README all say this one number.

/** Fewest and most rays one cell of a run may ask for (precisionSchema in ./sweep). */
export const MIN_RAYS_PER_CELL = 1000
export const MAX_RAYS_PER_CELL = 1_000_000_000
/** The team queue limit when LENSFIELD_TEAM_RAY_LIMIT is not set (server/queue/config.ts), in traced rays. */
export const DEFAULT_TEAM_RAY_LIMIT = 1_000_000_000

/**
 * Traced rays per requested ray in one cell: 2 for a lens film over a pixel source, on a finite panel, or a sheet emitter with a
 * spectrum (device + traced planar companion), else 1 (quadrature companion, or a flat stack). The engine's rule is the same
 * (shared/optics/run.ts tracesCompanion with the default quadrature companion).
 */
export function tracedPerRay(
  scenario: { lensArray?: unknown, panel?: unknown, emitter?: { source?: { shape?: string }, spectrum?: unknown, thinFilm?: unknown } } | null | undefined,
): 1 | 2 {
  if (!scenario?.lensArray) return 1
  // a finite panel's flat companion is traced over the same panel and measured by the same detector
  if (scenario.panel != null) return 2
  const e = scenario.emitter
  // a sheet emitter with a spectrum traces its companion too: the flat device's colour comes from its counts
  return e?.source?.shape !== 'extended' || (e.spectrum != null && e.thinFilm == null) ? 2 : 1
}

/**
 * The most rays per cell a run can ask for: `tracedPerCellRay` is tracedPerRay summed over the run's buildable
 * cells (1 or 2 for a single run), `waitingTracedRays` what the team already has queued or running.
 */
export function maxRaysPerCell(teamRayLimit: number, tracedPerCellRay: number, waitingTracedRays = 0): number {
  if (!(tracedPerCellRay > 0)) return MAX_RAYS_PER_CELL
  return Math.max(0, Math.min(MAX_RAYS_PER_CELL, Math.floor((teamRayLimit - waitingTracedRays) / tracedPerCellRay)))
}

/**
 * A ray count in a message, exact: whole billions as "1.00 G", whole millions as "500 M", anything else in full
 * ("500 001 000", "333 333 333"), so a refused count and the limit never read alike.
 */
export function formatRayCount(n: number): string {
  if (n >= 1e9 && n % 1e9 === 0) return `${(n / 1e9).toPrecision(3)} G`
  if (n >= 1e6 && n % 1e6 === 0) return `${n / 1e6} M`
  return new Intl.NumberFormat('en-GB').format(n).replace(/,/g, ' ')
}

/**
 * The team-limit refusal (429) in the user's rays: what was asked, the most that fits now, and why a lens
 * design's ray counts twice against the team's limit of traced rays.
 */
export function rayLimitMessage(raysPerCell: number, cells: number, tracedPerCellRay: number, waitingTraced: number, teamRayLimit: number): string {
  const fmt = formatRayCount
  const twice = tracedPerCellRay > cells
  const asked = cells > 1 ? `${cells} cells × ${fmt(raysPerCell)} rays` : `${fmt(raysPerCell)} rays`
  const most = maxRaysPerCell(teamRayLimit, tracedPerCellRay, waitingTraced)
  const fits = most < MIN_RAYS_PER_CELL ? 'no more'
    : `at most ${fmt(most)} ${waitingTraced > 0 ? 'more ' : ''}${cells > 1 ? 'rays per cell' : ''}`.trim()
  const why = twice
    ? `each ray of a lens design over a pixel source (or with a spectrum) is traced twice (through the film and through the flat device beside it), your team already has ${fmt(waitingTraced)} traced rays waiting and the limit is ${fmt(teamRayLimit)} traced rays`
    : `your team already has ${fmt(waitingTraced)} waiting and the limit is ${fmt(teamRayLimit)}`
  return `This would queue ${asked}, and ${fits} can be queued now: ${why}. Use fewer rays or cells, or wait for running work to finish.`
}
