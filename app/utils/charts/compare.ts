// Charts of the compare page (app/pages/compare.vue): 2–4 traced results' intensity or luminance against θ on one
// plot, one series colour each (SERIES_COLOURS, in the order of the page's table). Pure option builder and its CSV.
import type { TraceResult } from '#shared/types/result'
import { SERIES_COLOURS } from '../palette'

export type CompareCurve = 'intensity' | 'luminance'

/** One compared result: its label (run name, and the cell's coordinates for a sweep cell) and what is plotted. */
export interface CompareItem {
  label: string
  result: Pick<TraceResult, 'intensity' | 'luminance'>
}

/** The colour of the i-th compared item (the table's swatch and its curve). */
export function compareColour(i: number): string {
  return SERIES_COLOURS[i % SERIES_COLOURS.length]!
}

export function compareCurveOption(items: CompareItem[], what: CompareCurve) {
  return {
    animation: false,
    grid: { left: 64, right: 16, top: 24, bottom: 72 },
    legend: { bottom: 0, type: 'scroll' },
    tooltip: { trigger: 'axis' },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in air (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: what === 'intensity' ? 'intensity (sr⁻¹ per ray)' : 'L / L Lambertian (1)' },
    series: items.map((l, i) => ({
      name: l.label, type: 'line', showSymbol: false, lineStyle: { color: compareColour(i), width: 2 }, itemStyle: { color: compareColour(i) },
      data: l.result.intensity.thetaCentersDeg.map((t, j) => [t, what === 'intensity' ? l.result.intensity.perSteradian[j] : l.result.luminance.relative[j]]),
    })),
  }
}

/** The curves as CSV: θ, then each item's value and σ (the first item's θ bins; all results share the 1° bins). */
export function compareCurveCsv(items: CompareItem[], what: CompareCurve) {
  return {
    header: ['theta_deg', ...items.flatMap((l) => [`${l.label} (${what})`, `${l.label} (stderr)`])],
    rows: (items[0]?.result.intensity.thetaCentersDeg ?? []).map((t, j) => [t, ...items.flatMap((l) => what === 'intensity'
      ? [l.result.intensity.perSteradian[j], l.result.intensity.perSteradianStdErr[j]]
      : [l.result.luminance.relative[j], l.result.luminance.relativeStdErr[j]])]),
  }
}
