// Charts of one traced cell (the run and sweep-cell result view, app/components/run/RunCellResult.vue): intensity
// in air on a half-disc with the flat device and a Lambertian source of the same extracted flux, luminance against
// angle with its ±σ band, the θ–φ intensity map, and where the light goes. Pure option builders (echarts) and the CSV
// of what each plots; the component keeps only state.
import type { TraceResult } from '#shared/types/result'
import { pctErr } from '#shared/utils/format'
import { PALETTE } from '../palette'
import { bandSolidAngleSr, binomialStdErr, NEAR_AXIS_POOL_DEG, poolLeadingBins } from '../resultMath'
import type { ChartPoint } from './points'

const INK = PALETTE.ink.DEFAULT, EMBER = PALETTE.ember[600], LAGOON = PALETTE.lagoon[600], MUTED = PALETTE.ink.muted

/** What these charts read of a result (shared/types/result.ts). */
export type CellResult = Pick<TraceResult, 'rays' | 'extraction' | 'extractionStdErr' | 'intensity' | 'luminance' | 'losses' | 'lossesStdErr' | 'planar'>

/** The flat device's curves to overlay (the run's planar companion), or null for a planar design (its own companion). */
export interface FlatOverlay {
  perSteradian: number[]
  perSteradianStdErr: number[] | null
  luminanceRelative: number[] | null
}

export const POOL_NOTE = `0–${NEAR_AXIS_POOL_DEG}° pooled into one value`

/** The flat device of a result to overlay: its companion's curves, none when the design itself is planar. */
export function flatOverlay(r: CellResult, planarDesign: boolean): FlatOverlay | null {
  if (planarDesign || !r.planar?.perSteradian) return null
  return {
    perSteradian: r.planar.perSteradian,
    perSteradianStdErr: r.planar.perSteradianStdErr ?? null,
    luminanceRelative: r.planar.luminanceRelative ?? null,
  }
}

/** Lambertian share of the band [a°, b°] (sin²b − sin²a): the weight of luminance relative to Lambertian. */
export function lambertianShare(a: number, b: number): number {
  return Math.sin((b * Math.PI) / 180) ** 2 - Math.sin((a * Math.PI) / 180) ** 2
}

/** Intensity (sr⁻¹ per ray) of a Lambertian source with the same extracted flux: η cos θ / π. */
export function lambertianSameFlux(thetaDeg: number[], extraction: number): number[] {
  return thetaDeg.map((t) => (extraction * Math.cos((t * Math.PI) / 180)) / Math.PI)
}

/**
 * A per-bin curve with the first NEAR_AXIS_POOL_DEG 1° bins replaced by their pooled value (weights: the bins'
 * solid angle for intensity, their Lambertian share for luminance): the near-axis bins are tiny and their own
 * estimates noisy, so the curve would spike at 0°. Returns the curve and the pooled value ± σ.
 */
export function pooledCurve(thetaDeg: number[], vals: number[], errs: number[], weightOf: (a: number, b: number) => number) {
  const w = thetaDeg.slice(0, NEAR_AXIS_POOL_DEG).map((_, b) => weightOf(b, b + 1))
  const p = poolLeadingBins(vals, errs, w, NEAR_AXIS_POOL_DEG)
  return { curve: vals.map((v, i) => (i < NEAR_AXIS_POOL_DEG ? p.value : v)), ...p }
}

/** The on-axis intensity pooled over 0–NEAR_AXIS_POOL_DEG° (sr⁻¹ per ray) ± σ. */
export function pooledOnAxisIntensity(r: CellResult) {
  return pooledCurve(r.intensity.thetaCentersDeg, r.intensity.perSteradian, r.intensity.perSteradianStdErr, bandSolidAngleSr)
}

/** Intensity in air on a half-disc: 0° up, θ to the right, its mirror −θ to the left (the profile is azimuth-averaged). */
export function polarIntensityOption(r: CellResult, flat: FlatOverlay | null) {
  const theta = r.intensity.thetaCentersDeg
  const mirror = (vals: number[]) => [...theta.map((t, i) => [vals[i], -t]).reverse(), ...theta.map((t, i) => [vals[i], t])]
  const own = pooledOnAxisIntensity(r)
  const flatCurve = flat ? pooledCurve(theta, flat.perSteradian, flat.perSteradianStdErr ?? flat.perSteradian.map(() => 0), bandSolidAngleSr) : null
  const line = (name: string, data: unknown[], lineStyle: Record<string, unknown>) => ({
    name, type: 'line', coordinateSystem: 'polar', showSymbol: false, data, lineStyle, itemStyle: { color: lineStyle.color },
  })
  const series: Array<Record<string, unknown>> = [
    line('this design', mirror(own.curve), { color: EMBER, width: 2 }),
    line('Lambertian, same extracted flux', mirror(lambertianSameFlux(theta, r.extraction)), { color: MUTED, type: 'dashed' }),
  ]
  if (flatCurve) series.splice(1, 0, line('flat device (same stack, no lenses)', mirror(flatCurve.curve), { color: LAGOON, width: 1.5 }))
  return {
    animation: false,
    // legend above the half-disc, clear of the curves
    legend: { top: 0, textStyle: { color: INK } },
    tooltip: {
      trigger: 'item',
      formatter: (p: ChartPoint) => {
        const th = Math.abs(p.value[1]!)
        const i = Math.min(89, Math.floor(th))
        const err = p.seriesIndex === 0 ? (i < NEAR_AXIS_POOL_DEG ? own.stdErr : r.intensity.perSteradianStdErr[i]) : null
        const errText = err !== null && err !== undefined ? ` ± ${err.toExponential(1)} sr⁻¹` : ''
        const pooled = i < NEAR_AXIS_POOL_DEG && p.seriesIndex !== series.length - 1 ? `<br>${POOL_NOTE}` : ''
        return `${p.seriesName}<br>θ ${th.toFixed(1)}°: ${p.value[0]!.toExponential(3)} sr⁻¹${errText}${pooled}`
      },
    },
    polar: { radius: '92%', center: ['50%', '90%'] },
    angleAxis: {
      type: 'value', min: -90, max: 90, startAngle: 180, endAngle: 0, clockwise: true, interval: 30,
      axisLabel: { formatter: (v: number) => `${Math.abs(v)}°`, color: MUTED }, splitLine: { lineStyle: { color: PALETTE.rule.DEFAULT } },
    },
    // few rings, so their labels along the baseline stay apart and clear of the curves
    radiusAxis: {
      type: 'value', splitNumber: 3,
      axisLabel: { formatter: (v: number) => (v === 0 ? '' : v.toPrecision(2)), color: MUTED, fontSize: 10, margin: 4 },
      splitLine: { lineStyle: { color: PALETTE.paper.sunk } },
    },
    series,
  }
}

export function polarIntensityCsv(r: CellResult, flat: FlatOverlay | null) {
  const theta = r.intensity.thetaCentersDeg
  const lambert = lambertianSameFlux(theta, r.extraction)
  const flatErr = flat ? (flat.perSteradianStdErr ?? flat.perSteradian.map(() => 0)) : null
  return {
    header: ['theta_deg', 'intensity_per_sr', 'intensity_stderr_per_sr', 'lambertian_same_flux_per_sr',
      ...(flat ? ['flat_device_per_sr', 'flat_device_stderr_per_sr'] : [])],
    rows: theta.map((t, i) => [t, r.intensity.perSteradian[i], r.intensity.perSteradianStdErr[i], lambert[i]!,
      ...(flat ? [flat.perSteradian[i]!, flatErr![i]!] : [])]),
  }
}

/** Luminance relative to Lambertian against θ, with its ±σ band, the half-luminance angle and the flat device. */
export function luminanceOption(r: CellResult, flat: FlatOverlay | null) {
  const theta = r.intensity.thetaCentersDeg
  const lp = pooledCurve(theta, r.luminance.relative, r.luminance.relativeStdErr, lambertianShare)
  const L = lp.curve, E = r.luminance.relativeStdErr.map((e, i) => (i < NEAR_AXIS_POOL_DEG ? lp.stdErr : e))
  const halfDeg = r.luminance.halfLuminanceAngleDeg
  const refL = flat?.luminanceRelative ?? null
  const refPooled = refL ? pooledCurve(theta, refL, refL.map(() => 0), lambertianShare).value : 0
  return {
    animation: false,
    grid: { left: 56, right: 16, top: 36, bottom: 64 },
    tooltip: {
      trigger: 'axis',
      formatter: (ps: ChartPoint[]) => { const i = ps[0]!.dataIndex; return `θ ${theta[i]}°<br>L/L<sub>Lamb</sub> ${L[i]!.toFixed(3)} ± ${E[i]!.toFixed(3)}` },
    },
    legend: { bottom: 0, data: ['±σ band', 'this design', 'flat device'] },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in air (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'L / L Lambertian (1)', nameTextStyle: { align: 'left' } },
    series: [
      { name: '−σ', type: 'line', stack: 'band', showSymbol: false, data: theta.map((t, i) => [t, L[i]! - E[i]!]), lineStyle: { opacity: 0 }, tooltip: { show: false } },
      {
        name: '±σ band', type: 'line', stack: 'band', showSymbol: false, data: theta.map((t, i) => [t, 2 * E[i]!]), lineStyle: { opacity: 0 },
        areaStyle: { color: 'rgba(217,137,43,0.25)' }, // PALETTE.ember[500] at a quarter
      },
      {
        name: 'this design', type: 'line', showSymbol: false, data: theta.map((t, i) => [t, L[i]]), lineStyle: { color: EMBER, width: 2 }, itemStyle: { color: EMBER },
        markLine: halfDeg !== null && halfDeg !== undefined
          ? { symbol: 'none', label: { formatter: `half ${halfDeg.toFixed(1)}°`, position: 'insideEndTop' }, lineStyle: { color: MUTED, type: 'dotted' }, data: [{ xAxis: halfDeg }] }
          : undefined,
      },
      ...(refL
        ? [{
            name: 'flat device', type: 'line', showSymbol: false, data: theta.map((t, i) => [t, i < NEAR_AXIS_POOL_DEG ? refPooled : refL[i]]),
            lineStyle: { color: LAGOON }, itemStyle: { color: LAGOON },
          }]
        : []),
    ],
  }
}

export function luminanceCsv(r: CellResult) {
  return {
    header: ['theta_deg', 'relative_luminance', 'relative_luminance_stderr'],
    rows: r.intensity.thetaCentersDeg.map((t, i) => [t, r.luminance.relative[i], r.luminance.relativeStdErr[i]]),
  }
}

/**
 * The θ–φ intensity map. Colour scale to the 99th percentile of the non-zero bins: the small solid angle of the bins
 * next to the axis makes a few noisy hot bins that would otherwise wash out the rest of the map (values above show
 * in the top colour).
 */
export function intensityMapOption(r: CellResult) {
  const m = r.intensity.map
  const data: number[][] = []
  for (let b = 0; b < m.thetaBins; b++) for (let p = 0; p < m.phiBins; p++) data.push([p, b, m.perSteradian[b * m.phiBins + p]!])
  const sorted = data.map((d) => d[2]!).filter((v) => v > 0).sort((a, b) => a - b)
  const max = sorted.length ? sorted[Math.floor(0.99 * (sorted.length - 1))]! : 1
  return {
    animation: false,
    grid: { left: 56, right: 90, top: 28, bottom: 44 },
    tooltip: {
      formatter: (p: ChartPoint) => `θ ${p.value[1]}–${p.value[1]! + 1}°, φ ${p.value[0]! * m.phiBinWidthDeg}–${(p.value[0]! + 1) * m.phiBinWidthDeg}°<br>`
        + `${p.value[2]!.toExponential(3)} ± ${m.perSteradianStdErr[p.value[1]! * m.phiBins + p.value[0]!]!.toExponential(1)} sr⁻¹`,
    },
    xAxis: {
      type: 'category', data: Array.from({ length: m.phiBins }, (_, i) => i * m.phiBinWidthDeg), name: 'φ (°)', nameLocation: 'middle', nameGap: 26,
      axisLabel: { interval: 8 },
    },
    yAxis: { type: 'category', data: Array.from({ length: m.thetaBins }, (_, i) => i), name: 'θ (°)', axisLabel: { interval: 14 } },
    visualMap: {
      min: 0, max, calculable: true, orient: 'vertical', right: 0, top: 'center', itemHeight: 180, text: ['sr⁻¹', ''],
      inRange: { color: [PALETTE.paper.DEFAULT, PALETTE.ember[200], PALETTE.ember[500], PALETTE.ember[800]] }, formatter: (v: number) => v.toPrecision(2),
    },
    series: [{ type: 'heatmap', data, progressive: 0 }],
  }
}

export function intensityMapCsv(r: CellResult) {
  const m = r.intensity.map
  const rows: Array<Array<number | undefined>> = []
  for (let b = 0; b < m.thetaBins; b++) {
    for (let p = 0; p < m.phiBins; p++) {
      rows.push([b, b + 1, p * m.phiBinWidthDeg, (p + 1) * m.phiBinWidthDeg, m.perSteradian[b * m.phiBins + p], m.perSteradianStdErr[b * m.phiBins + p]])
    }
  }
  return { header: ['theta_from_deg', 'theta_to_deg', 'phi_from_deg', 'phi_to_deg', 'intensity_per_sr', 'intensity_stderr_per_sr'], rows }
}

const LOSS = [
  ['extracted', 'Into air'], ['reflector', 'Absorbed at the back reflector'], ['substrate', 'Absorbed in substrate/lens'],
  ['waveguided', 'Guided in the organic layers'], ['trapped', 'Trapped in the glass'], ['unresolved', 'Unresolved (event limit or batch budget)'],
] as const
// a layer-stack source has no back reflector: the stack's own losses (evanescent coupling and absorption at
// emission, and light sent back down to it) take its row
const STACK_LOSS = ['stackAbsorbed', 'Lost in the layer stack (plasmons, absorption, light sent back)'] as const
// a finite panel adds the glass edges (absorbed there, or out through polished ones)
const EDGE_LOSS = ['edge', 'At the panel edges (absorbed, or out through them)'] as const

export interface LossRow { k: string; label: string; dev: number; devErr: number; flat: number; flatErr: number }

/** Where the light goes: each channel's share of emitted light ± σ, for the design and its flat device. */
export function lossRows(r: CellResult): LossRow[] {
  const n = r.rays
  const base = r.losses.stackAbsorbed === undefined ? [...LOSS] : LOSS.map((l) => (l[0] === 'reflector' ? STACK_LOSS : l))
  const rows = r.losses.edge === undefined ? base : [...base.slice(0, -1), EDGE_LOSS, base[base.length - 1]!]
  return rows.map(([k, label]) => {
    const dev = (k === 'extracted' ? r.extraction : r.losses[k]) ?? 0
    const devErr = (k === 'extracted' ? r.extractionStdErr : r.lossesStdErr[k]) ?? 0
    const flat = (k === 'extracted' ? r.planar.extraction : r.planar.losses[k]) ?? 0
    // a flat device by quadrature is exact (σ 0); a traced one carries the binomial σ of its own rays
    const flatErr = k === 'extracted' ? r.planar.extractionStdErr : r.planar.method === 'quadrature' ? 0 : binomialStdErr(flat, n)
    return { k, label, dev, devErr, flat, flatErr }
  })
}

export function lossOption(rows: LossRow[]) {
  return {
    animation: false,
    grid: { left: 190, right: 24, top: 32, bottom: 48 },
    legend: { top: 0 },
    tooltip: {
      trigger: 'axis', axisPointer: { type: 'shadow' },
      formatter: (ps: ChartPoint[]) => {
        const l = rows[ps[0]!.dataIndex]!
        return `${l.label}<br>this design ${pctErr(l.dev, l.devErr)}<br>flat device ${pctErr(l.flat, l.flatErr)}`
      },
    },
    xAxis: { type: 'value', max: 100, name: 'share of emitted light (%)', nameLocation: 'middle', nameGap: 28 },
    yAxis: { type: 'category', inverse: true, data: rows.map((l) => l.label) },
    series: [
      { name: 'this design', type: 'bar', data: rows.map((l) => +(l.dev * 100).toFixed(3)), itemStyle: { color: EMBER } },
      { name: 'flat device (companion)', type: 'bar', data: rows.map((l) => +(l.flat * 100).toFixed(3)), itemStyle: { color: LAGOON } },
    ],
  }
}

export function lossCsv(rows: LossRow[]) {
  return {
    header: ['channel', 'fraction', 'fraction_stderr', 'flat_fraction', 'flat_fraction_stderr'],
    rows: rows.map((l) => [l.k, l.dev, l.devErr, l.flat, l.flatErr]),
  }
}
