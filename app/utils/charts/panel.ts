// Chart option (echarts) and CSV rows for a finite panel's reading (`result.panel`): the luminance of the light that
// leaves the front face inside the detector's spot, by angle, for the design and its flat companion measured the same
// way, with the ±σ band. Pure: it takes the parsed result block and returns plain objects (tested without a browser).
import type { PanelResult } from '#shared/types/result'
import type { CsvTable } from './thinFilm'

const INK = '#17202b', EMBER = '#b86d18', LAGOON = '#1f6b6a', MUTED = '#64707f'

/** Edge kinds in the trade's words. */
export const EDGE_NAMES: Record<PanelResult['edges'], string> = {
  absorbing: 'absorbing (blackened)', mirrored: 'mirrored', ground: 'ground (diffuse)', polished: 'polished (light leaves)',
}

/** Luminance of the spot by 1° bin (θ centres), design and flat companion; null when the detector has no spot (sphere). */
export function spotLuminanceOption(p: PanelResult): Record<string, unknown> | null {
  const s = p.spot
  if (!s) return null
  const th = s.luminanceRelative.map((_, i) => i + 0.5)
  const L = s.luminanceRelative, E = s.luminanceRelativeStdErr
  return {
    animation: false,
    grid: { left: 56, right: 16, top: 36, bottom: 64 },
    tooltip: { trigger: 'axis' },
    legend: { bottom: 0, data: ['±σ band', 'this design', 'flat device'], textStyle: { color: INK } },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in air (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'L / L Lambertian (1)', nameTextStyle: { align: 'left', color: MUTED } },
    series: [
      { name: '−σ', type: 'line', stack: 'band', showSymbol: false, data: th.map((t, i) => [t, L[i]! - E[i]!]), lineStyle: { opacity: 0 }, tooltip: { show: false } },
      { name: '±σ band', type: 'line', stack: 'band', showSymbol: false, data: th.map((t, i) => [t, 2 * E[i]!]), lineStyle: { opacity: 0 }, areaStyle: { color: 'rgba(217,137,43,0.25)' } },
      { name: 'this design', type: 'line', showSymbol: false, data: th.map((t, i) => [t, L[i]!]), lineStyle: { color: EMBER, width: 2 }, itemStyle: { color: EMBER } },
      { name: 'flat device', type: 'line', showSymbol: false, data: th.map((t, i) => [t, s.planarLuminanceRelative[i]!]), lineStyle: { color: LAGOON }, itemStyle: { color: LAGOON } },
    ],
  }
}

export function spotLuminanceCsv(p: PanelResult): CsvTable {
  const s = p.spot
  if (!s) return { header: [], rows: [] }
  return {
    header: ['theta_from_deg', 'theta_to_deg', 'relative_luminance', 'relative_luminance_stderr', 'flat_relative_luminance', 'flat_relative_luminance_stderr',
      'intensity_per_sr', 'intensity_stderr_per_sr'],
    rows: s.luminanceRelative.map((v, i) => [i, i + 1, v, s.luminanceRelativeStdErr[i]!, s.planarLuminanceRelative[i]!, s.planarLuminanceRelativeStdErr[i]!,
      s.perSteradian[i]!, s.perSteradianStdErr[i]!]),
  }
}
