// Chart options (echarts) and their CSV rows for a thin-film source's result block (`result.thinFilm`): the power
// dissipation spectrum K(u) with its regions, the mode split flat vs film, and the angular emission into the
// glass. Pure: they take the parsed result and return plain objects, so they are tested without a browser.
import type { ThinFilmResult } from '#shared/types/result'
import { PALETTE } from '../palette'

const INK = PALETTE.ink.DEFAULT, EMBER = PALETTE.ember[600], LAGOON = PALETTE.lagoon[600], MUTED = PALETTE.ink.muted, PLUM = '#7a4f86'

export interface CsvTable { header: string[]; rows: Array<Array<string | number | null>> }

/**
 * The regions of in-plane wavevector u = k_x/k_e (k_e in the emitting layer): light that can reach air (u < uAir),
 * the glass only (uAir–uGlass), modes guided in the organic/ITO layers (uGlass–1), and evanescent coupling beyond
 * u = 1 (surface plasmons at the cathode, lossy surface waves).
 */
export function dissipationRegions(d: ThinFilmResult['dissipation']): Array<{ key: string; label: string; from: number; to: number; colour: string }> {
  // the plotted range ends at the last u rounded up to 0.1 (a round axis end)
  const uMax = Math.max(Math.ceil((d.u.length ? d.u[d.u.length - 1]! : 1) * 10 - 1e-9) / 10, 1.1)
  return [
    { key: 'air', label: 'air', from: 0, to: d.uAir, colour: 'rgba(31,107,106,0.14)' },
    { key: 'glass', label: 'glass', from: d.uAir, to: d.uGlass, colour: 'rgba(31,107,106,0.06)' },
    { key: 'waveguided', label: 'guided', from: d.uGlass, to: 1, colour: 'rgba(184,109,24,0.09)' },
    { key: 'evanescent', label: 'evanescent / plasmon', from: 1, to: uMax, colour: 'rgba(122,79,134,0.10)' },
  ]
}

/**
 * The log axis's span: from three decades below the median K of the mix (the near-zero K at u → 0 and deep in the
 * evanescent tail would otherwise squeeze the curves into a band) up to the decade above the highest K, so sharp
 * guided-mode and plasmon peaks stay whole.
 */
export function dissipationLogRange(d: ThinFilmResult['dissipation']): { min: number; max: number } {
  let peak = 0
  for (const ks of [d.teHorizontal, d.tmHorizontal, d.tmVertical, d.mixed]) for (const k of ks) if (Number.isFinite(k) && k > peak) peak = k
  const pos = d.mixed.filter((k) => Number.isFinite(k) && k > 0).sort((a, b) => a - b)
  if (!(peak > 0) || pos.length === 0) return { min: 1e-3, max: 10 }
  const median = pos[Math.floor(pos.length / 2)]!
  return { min: 10 ** (Math.floor(Math.log10(median)) - 3), max: 10 ** Math.ceil(Math.log10(peak) + 1e-9) }
}

// a log axis has no place for K ≤ 0 (or a non-finite value): such points are left out of the line
const logPoint = (u: number, k: number | undefined): [number, number | null] => [u, k !== undefined && Number.isFinite(k) && k > 0 ? k : null]

/** log K against u: TE-h, TM-h, TM-v and the orientation mix, the four regions shaded and named. */
export function dissipationOption(tf: ThinFilmResult): Record<string, unknown> {
  const d = tf.dissipation
  const regions = dissipationRegions(d)
  const line = (name: string, ks: number[], colour: string, extra: Record<string, unknown> = {}) => ({
    name, type: 'line', showSymbol: false, connectNulls: false, data: d.u.map((u, i) => logPoint(u, ks[i])), lineStyle: { color: colour, width: 1.4 }, itemStyle: { color: colour }, ...extra,
  })
  const th = tf.horizontalDipoleFraction
  const range = dissipationLogRange(d)
  return {
    animation: false,
    grid: { left: 64, right: 20, top: 40, bottom: 72 },
    legend: { bottom: 0, textStyle: { color: INK } },
    tooltip: { trigger: 'axis', valueFormatter: (v: number | null) => (v === null || v === undefined ? '—' : Number(v).toExponential(3)) },
    xAxis: { type: 'value', min: 0, max: regions[3]!.to, name: 'u = in-plane wavevector / k in the emitting layer (1)', nameLocation: 'middle', nameGap: 28 },
    yAxis: { type: 'log', min: range.min, max: range.max, name: 'K(u) (1, free emitting medium: ∫K du = 1)', nameTextStyle: { align: 'left' }, axisLabel: { formatter: (v: number) => v.toExponential(0) } },
    series: [
      line('TE, horizontal', d.teHorizontal, LAGOON),
      line('TM, horizontal', d.tmHorizontal, EMBER),
      line('TM, vertical', d.tmVertical, PLUM),
      line(`mixed (Θ = ${Number(th.toPrecision(3))})`, d.mixed, INK, {
        lineStyle: { color: INK, width: 2.2 },
        markArea: {
          silent: true,
          label: { color: MUTED, fontSize: 11 },
          // names alternately at the top and the bottom, so the narrow guided band's does not run into its neighbours'
          data: regions.map((r, i) => [{ name: r.label, xAxis: r.from, itemStyle: { color: r.colour }, label: { position: i % 2 === 0 ? 'insideTop' : 'insideBottom' } }, { xAxis: r.to }]),
        },
      }),
    ],
  }
}

export function dissipationCsv(tf: ThinFilmResult): CsvTable {
  const d = tf.dissipation
  return {
    header: ['u', 'K_te_horizontal', 'K_tm_horizontal', 'K_tm_vertical', 'K_mixed', 'region'],
    rows: d.u.map((u, i) => [u, d.teHorizontal[i]!, d.tmHorizontal[i]!, d.tmVertical[i]!, d.mixed[i]!, u < d.uAir ? 'air' : u < d.uGlass ? 'glass' : u < 1 ? 'waveguided' : 'evanescent']),
  }
}

export const MODE_CHANNELS = [
  ['air', 'into air', LAGOON],
  ['glass', 'reached the glass, not air', '#7fb7b6'],
  ['waveguided', 'waveguided in the layers', EMBER],
  ['evanescent', 'evanescent / plasmon', PLUM],
  ['absorbed', 'absorbed in the stack', '#9aa2ad'],
] as const

/** The mode split as one stacked bar each for the flat device (exact) and the device with the film (traced), %. */
export function modeSplitOption(tf: ThinFilmResult): Record<string, unknown> {
  const bars = [['flat device (exact)', tf.modes.flat], ['with the film (traced)', tf.modes.film]] as const
  return {
    animation: false,
    grid: { left: 150, right: 24, top: 16, bottom: 96 },
    legend: { bottom: 0, textStyle: { color: INK } },
    tooltip: {
      trigger: 'axis', axisPointer: { type: 'shadow' },
      formatter: (ps: Array<{ dataIndex: number; seriesIndex: number; marker: string }>) => {
        const [label, m] = bars[ps[0]!.dataIndex]!
        return `${label}<br>${ps.map((p) => {
          const [key, words] = MODE_CHANNELS[p.seriesIndex]!
          const err = key === 'air' ? m.airStdErr : key === 'glass' ? m.glassStdErr : undefined
          return `${p.marker}${words}: ${(m[key] * 100).toFixed(2)}${err !== undefined ? ` ± ${(err * 100).toFixed(2)}` : ''} %`
        }).join('<br>')}`
      },
    },
    xAxis: { type: 'value', min: 0, max: 100, name: 'share of the dipole power (%)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'category', inverse: true, data: bars.map((b) => b[0]) },
    series: MODE_CHANNELS.map(([key, words, colour]) => ({
      name: words, type: 'bar', stack: 'modes', barWidth: '46%', itemStyle: { color: colour },
      data: bars.map(([, m]) => Number((m[key] * 100).toFixed(4))),
    })),
  }
}

export function modeSplitCsv(tf: ThinFilmResult): CsvTable {
  const f = tf.modes.flat, m = tf.modes.film
  return {
    header: ['channel', 'flat_fraction', 'film_fraction', 'film_fraction_stderr'],
    rows: MODE_CHANNELS.map(([key]) => [key, f[key], m[key], key === 'air' ? m.airStdErr ?? null : key === 'glass' ? m.glassStdErr ?? null : null]),
  }
}

/** Power into the glass per steradian per unit dipole power against the polar angle in the glass: s, p and both. */
export function glassEmissionOption(tf: ThinFilmResult): Record<string, unknown> {
  const g = tf.glassEmission
  const series = (name: string, ys: number[], colour: string, width = 1.5) => ({ name, type: 'line', showSymbol: false, data: g.thetaDeg.map((t, i) => [t, ys[i]!]), lineStyle: { color: colour, width }, itemStyle: { color: colour } })
  return {
    animation: false,
    grid: { left: 64, right: 20, top: 36, bottom: 64 },
    legend: { bottom: 0, textStyle: { color: INK } },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => `${Number(v).toExponential(3)} sr⁻¹` },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in the glass (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'power per sr / dipole power (sr⁻¹)', nameTextStyle: { align: 'left' } },
    series: [
      series('s-polarised', g.s, LAGOON),
      series('p-polarised', g.p, EMBER),
      series('s + p', g.s.map((v, i) => v + g.p[i]!), INK, 2.2),
    ],
  }
}

export function glassEmissionCsv(tf: ThinFilmResult): CsvTable {
  const g = tf.glassEmission
  return { header: ['theta_glass_deg', 's_per_sr', 'p_per_sr', 'total_per_sr'], rows: g.thetaDeg.map((t, i) => [t, g.s[i]!, g.p[i]!, g.s[i]! + g.p[i]!]) }
}
