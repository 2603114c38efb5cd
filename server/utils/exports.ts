// Result exports of one run cell: JSON (everything, as the cell route returns it, plus the run's context) and a
// long-format CSV (one value per line: section, theta_deg, phi_deg, quantity, value, std_err; with a spectrum also
// the colour per 2° band, sections colour / planar_colour) that pandas, R or a
// spreadsheet pivot reads as it is. User text is always a quoted field, formula starts neutralised
// (shared/utils/csv-cell.ts); the metadata lines are rows whose first field starts with #.
import type { TraceResult } from '../../shared/types/result'
import type { Run } from '../db/schema'
import { csvCommentRow } from '../../shared/utils/csv-cell'
import { fileName } from '../../shared/utils/file-name'

const num = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '' : String(x))

export function resultCsv(run: Pick<Run, 'name' | 'designName' | 'designVersion' | 'id'>, cellIndex: number, coordinates: unknown, r: TraceResult): string {
  const out: string[] = [
    csvCommentRow('Lensfield result', ['run', run.name, 'run_id', run.id, 'cell', cellIndex, 'design', run.designName, 'design_version', run.designVersion]),
    csvCommentRow('trace', ['coordinates', JSON.stringify(coordinates), 'rays', r.rays, 'seed', r.seed, 'std_err', 'one standard error (1σ) of the Monte Carlo estimate']),
    'section,theta_deg,phi_deg,quantity,value,std_err',
  ]
  const row = (section: string, theta: number | null, phi: number | null, q: string, v: number | null, e: number | null) =>
    out.push(`${section},${num(theta)},${num(phi)},${q},${num(v)},${num(e)}`)
  row('summary', null, null, 'extraction', r.extraction, r.extractionStdErr)
  row('summary', null, null, 'enhancement', r.enhancement, r.enhancementStdErr)
  row('summary', null, null, 'planar_extraction', r.planar.extraction, r.planar.extractionStdErr)
  row('summary', null, null, 'on_axis_luminance_relative', r.luminance.onAxisRelative, r.luminance.onAxisRelativeStdErr)
  row('summary', null, null, 'half_luminance_angle_deg', r.luminance.halfLuminanceAngleDeg, null)
  for (const [k, v] of Object.entries(r.losses)) row('losses', null, null, k, v, (r.lossesStdErr as Record<string, number>)[k] ?? null)
  const I = r.intensity
  I.thetaCentersDeg.forEach((t, b) => {
    row('profile', t, null, 'intensity_per_sr', I.perSteradian[b]!, I.perSteradianStdErr[b]!)
    row('profile', t, null, 'luminance_relative', r.luminance.relative[b]!, r.luminance.relativeStdErr[b]!)
  })
  // colour over angle (with an emission spectrum): per 2° band of the device (section colour) and of its flat
  // companion (planar_colour); spectra at a few angles as relative_power_<nm>nm (peak = 1, no σ)
  for (const [section, c] of [['colour', r.colour], ['planar_colour', r.planarColour]] as const) {
    if (!c) continue
    row(section, null, null, 'max_delta_uv_to_60', c.maxDeltaUvTo60, c.maxDeltaUvTo60StdErr)
    row(section, null, null, 'photopic_on_axis_relative', c.photopicOnAxisRelative, c.photopicOnAxisRelativeStdErr)
    row(section, null, null, 'luminous_efficacy_lm_per_w', c.luminousEfficacyLmPerW, c.luminousEfficacyStdErrLmPerW)
    c.bandCentersDeg.forEach((t, b) => {
      row(section, t, null, 'x', c.x[b] ?? null, c.xStdErr?.[b] ?? null)
      row(section, t, null, 'y', c.y[b] ?? null, c.yStdErr?.[b] ?? null)
      row(section, t, null, 'u_prime', c.uPrime[b] ?? null, c.uPrimeStdErr[b] ?? null)
      row(section, t, null, 'v_prime', c.vPrime[b] ?? null, c.vPrimeStdErr[b] ?? null)
      row(section, t, null, 'delta_uv', c.deltaUv[b] ?? null, c.deltaUvStdErr[b] ?? null)
      row(section, t, null, 'photopic_luminance_relative', c.photopicRelative[b] ?? null, c.photopicRelativeStdErr[b] ?? null)
    })
    c.spectra.anglesDeg.forEach((t, k) => {
      c.wavelengthCentersNm.forEach((nm, j) => row(`${section}_spectrum`, t, null, `relative_power_${nm}nm`, c.spectra.relative[k]![j]!, null))
    })
  }
  if (r.photopicOnAxisGain !== undefined && r.photopicOnAxisGain !== null) row('summary', null, null, 'photopic_on_axis_gain', r.photopicOnAxisGain, r.photopicOnAxisGainStdErr ?? null)
  const { thetaBins, phiBins, phiBinWidthDeg } = I.map
  for (let b = 0; b < thetaBins; b++) {
    for (let p = 0; p < phiBins; p++) {
      row('map', b + 0.5, (p + 0.5) * phiBinWidthDeg, 'intensity_per_sr', I.map.perSteradian[b * phiBins + p]!, I.map.perSteradianStdErr[b * phiBins + p]!)
    }
  }
  return out.join('\n') + '\n'
}

/** A file name from free text: letters, digits, dot, dash, underscore. */
export function downloadName(...parts: string[]): string {
  // units and symbols spelled out (10 µm → 10um, θ → theta), parts joined with _ (shared/utils/file-name.ts)
  return fileName(...parts)
}

/**
 * A cell's scenario as exported: trace.rays and trace.seed say what was actually traced (the rays counted in the
 * cell and its own seed), not the design's request, so re-running the file reproduces the exported figures.
 */
export function tracedScenario(scenario: unknown, raysTraced: number, seed: number): unknown {
  if (!scenario || typeof scenario !== 'object') return scenario
  const sc = scenario as { trace?: Record<string, unknown> }
  return { ...sc, trace: { ...(sc.trace ?? {}), rays: raysTraced, seed } }
}
