// Colour over viewing angle (result.colour and result.planarColour, shared/types/result.ts colourSchema): the
// CIE 1931 chromaticity diagram with the colour trajectory 0–80°, Δu′v′ against angle with σ bands, the spectra
// leaving at a few angles, and photopic against radiometric luminance. Pure option builders (echarts) and the CSV
// of what each plots; the result page and the sweep cell view mount them through ChartPanel.
import type { ColourResult, TraceResult } from '#shared/types/result'
import { LOCUS_LABELS_NM, SPECTRAL_LOCUS_XY } from './cieLocus'
import { PALETTE } from '../palette'

const INK = PALETTE.ink.DEFAULT, EMBER = PALETTE.ember[600], LAGOON = PALETTE.lagoon[600], MUTED = PALETTE.ink.muted, RULE = PALETTE.rule.DEFAULT
const SPECTRUM_SHADES = [EMBER, PALETTE.ember[500], PALETTE.ember[800], '#a8742f']
/** The trajectory is drawn to this polar angle (deg). */
export const TRAJECTORY_MAX_DEG = 80

type Colours = { device: ColourResult; flat: ColourResult | null }

/** The colour blocks of a result, or null without a spectrum. A planar design's companion is itself: no flat copy. */
export function colourBlocks(r: Pick<TraceResult, 'colour' | 'planarColour'>, planarDesign = false): Colours | null {
  if (!r.colour) return null
  return { device: r.colour, flat: planarDesign ? null : (r.planarColour ?? null) }
}

/** (angle, x, y) of the bands with centres up to maxDeg that hold rays. */
export function trajectory(c: ColourResult, maxDeg = TRAJECTORY_MAX_DEG): Array<[number, number, number]> {
  const out: Array<[number, number, number]> = []
  c.bandCentersDeg.forEach((deg, i) => {
    const x = c.x[i], y = c.y[i]
    if (deg <= maxDeg && x !== null && x !== undefined && y !== null && y !== undefined) out.push([deg, x, y])
  })
  return out
}

function trajectorySeries(name: string, pts: Array<[number, number, number]>, color: string) {
  return {
    name, type: 'line', data: pts.map(([deg, x, y]) => ({ value: [x, y, deg] })), symbolSize: 5, lineStyle: { color, width: 2 }, itemStyle: { color },
    label: { show: true, formatter: (p: { dataIndex: number; value: number[] }) => (p.dataIndex === 0 || p.dataIndex === pts.length - 1 ? `${p.value[2]}°` : ''), color, fontSize: 11, position: 'right' },
    z: 3,
  }
}

/**
 * The chromaticity diagram: spectral locus (with the purple line closing it), equal-energy white, and the device's
 * and the flat device's colour from 0° to 80°. `zoom`: the axes fit the trajectories (the shift is often a few
 * thousandths, a dot on the whole diagram).
 */
export function chromaticityOption(cs: Colours, opts: { zoom?: boolean } = {}): Record<string, unknown> {
  const dev = trajectory(cs.device)
  const flat = cs.flat ? trajectory(cs.flat) : []
  const locus = [...SPECTRAL_LOCUS_XY.map(([, x, y]) => [x, y]), [SPECTRAL_LOCUS_XY[0]![1], SPECTRAL_LOCUS_XY[0]![2]]]
  let xr: [number, number] = [0, 0.8], yr: [number, number] = [0, 0.9]
  if (opts.zoom && dev.length) {
    const xs = [...dev, ...flat].map((p) => p[1]), ys = [...dev, ...flat].map((p) => p[2])
    const span = Math.max(0.004, Math.max(...xs) - Math.min(...xs), Math.max(...ys) - Math.min(...ys))
    const cx = (Math.max(...xs) + Math.min(...xs)) / 2, cy = (Math.max(...ys) + Math.min(...ys)) / 2
    // a square window 1.4 × the larger spread, so the shape of the path is not stretched
    xr = [cx - 0.7 * span, cx + 0.7 * span]; yr = [cy - 0.7 * span, cy + 0.7 * span]
  }
  const dp = opts.zoom ? 4 : 1
  return {
    animation: false,
    grid: { left: 56, right: 24, top: 32, bottom: 48 },
    legend: { top: 0, data: ['this design', ...(flat.length ? ['flat device'] : [])], textStyle: { color: INK } },
    tooltip: { trigger: 'item', formatter: (p: { seriesName: string; value: number[] }) => (p.value.length > 2 ? `${p.seriesName}, θ ${p.value[2]}°<br>x ${p.value[0]!.toFixed(4)}, y ${p.value[1]!.toFixed(4)}` : `x ${p.value[0]!.toFixed(4)}, y ${p.value[1]!.toFixed(4)}`) },
    xAxis: { type: 'value', min: Number(xr[0].toFixed(4)), max: Number(xr[1].toFixed(4)), name: 'x', nameLocation: 'middle', nameGap: 26, axisLabel: { formatter: (v: number) => v.toFixed(dp) }, splitLine: { lineStyle: { color: RULE } } },
    yAxis: { type: 'value', min: Number(yr[0].toFixed(4)), max: Number(yr[1].toFixed(4)), name: 'y', axisLabel: { formatter: (v: number) => v.toFixed(dp) }, splitLine: { lineStyle: { color: RULE } } },
    series: [
      { name: 'spectral locus', type: 'line', data: locus, showSymbol: false, lineStyle: { color: MUTED, width: 1 }, silent: true, z: 1 },
      ...(opts.zoom ? [] : [{
        name: 'wavelength (nm)', type: 'scatter', symbolSize: 3, itemStyle: { color: MUTED }, silent: true, z: 1,
        label: { show: true, position: 'left', color: MUTED, fontSize: 10, formatter: (p: { value: number[] }) => `${p.value[2]}` },
        data: SPECTRAL_LOCUS_XY.filter(([nm]) => LOCUS_LABELS_NM.includes(nm)).map(([nm, x, y]) => [x, y, nm]),
      }]),
      { name: 'equal-energy white', type: 'scatter', data: [[1 / 3, 1 / 3]], symbol: 'diamond', symbolSize: 7, itemStyle: { color: MUTED }, z: 2 },
      trajectorySeries('this design', dev, EMBER),
      ...(flat.length ? [trajectorySeries('flat device', flat, LAGOON)] : []),
    ],
  }
}

export function chromaticityCsv(cs: Colours) {
  const f = cs.flat
  return {
    header: ['theta_deg', 'x', 'y', 'u_prime', 'v_prime', ...(f ? ['flat_x', 'flat_y', 'flat_u_prime', 'flat_v_prime'] : [])],
    rows: cs.device.bandCentersDeg.map((deg, i) => [
      deg, cs.device.x[i] ?? null, cs.device.y[i] ?? null, cs.device.uPrime[i] ?? null, cs.device.vPrime[i] ?? null,
      ...(f ? [f.x[i] ?? null, f.y[i] ?? null, f.uPrime[i] ?? null, f.vPrime[i] ?? null] : []),
    ]),
  }
}

/** ±σ band under a curve: two stacked invisible/filled series (null where the band holds no rays). */
function band(name: string, deg: number[], v: Array<number | null>, e: Array<number | null>, fill: string, stack: string) {
  return [
    { name: `${name} −σ`, type: 'line', stack, showSymbol: false, data: deg.map((d, i) => [d, v[i] === null || v[i] === undefined ? null : v[i]! - (e[i] ?? 0)]), lineStyle: { opacity: 0 }, tooltip: { show: false }, silent: true },
    { name: `${name} ±σ`, type: 'line', stack, showSymbol: false, data: deg.map((d, i) => [d, v[i] === null || v[i] === undefined ? null : 2 * (e[i] ?? 0)]), lineStyle: { opacity: 0 }, areaStyle: { color: fill }, tooltip: { show: false }, silent: true },
  ]
}

/** Δu′v′ against the on-axis colour, device and flat device, each with its ±σ band. */
export function deltaUvOption(cs: Colours): Record<string, unknown> {
  const d = cs.device, f = cs.flat
  const deg = d.bandCentersDeg
  const fmt = (v: number | null | undefined, e: number | null | undefined) => (v === null || v === undefined ? '—' : `${v.toFixed(4)} ± ${(e ?? 0).toFixed(4)}`)
  return {
    animation: false,
    grid: { left: 64, right: 16, top: 36, bottom: 64 },
    legend: { bottom: 0, data: ['this design', ...(f ? ['flat device'] : [])] },
    tooltip: { trigger: 'axis', formatter: (ps: Array<{ dataIndex: number }>) => { const i = ps[0]!.dataIndex; return `θ ${deg[i]}°<br>this design Δu′v′ ${fmt(d.deltaUv[i], d.deltaUvStdErr[i])}${f ? `<br>flat device ${fmt(f.deltaUv[i], f.deltaUvStdErr[i])}` : ''}` } },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in air (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'Δu′v′ from on-axis (1)', nameTextStyle: { align: 'left' }, min: 0 },
    series: [
      ...band('this design', deg, d.deltaUv, d.deltaUvStdErr, 'rgba(217,137,43,0.25)', 'dev'),
      { name: 'this design', type: 'line', showSymbol: false, data: deg.map((t, i) => [t, d.deltaUv[i] ?? null]), lineStyle: { color: EMBER, width: 2 }, itemStyle: { color: EMBER },
        markLine: { symbol: 'none', label: { formatter: '60°', position: 'insideEndTop' }, lineStyle: { color: MUTED, type: 'dotted' }, data: [{ xAxis: 60 }] } },
      ...(f ? [
        ...band('flat device', f.bandCentersDeg, f.deltaUv, f.deltaUvStdErr, 'rgba(31,107,106,0.18)', 'flat'),
        { name: 'flat device', type: 'line', showSymbol: false, data: f.bandCentersDeg.map((t, i) => [t, f.deltaUv[i] ?? null]), lineStyle: { color: LAGOON, width: 1.5 }, itemStyle: { color: LAGOON } },
      ] : []),
    ],
  }
}

export function deltaUvCsv(cs: Colours) {
  const d = cs.device, f = cs.flat
  return {
    header: ['theta_deg', 'delta_uv', 'delta_uv_stderr', ...(f ? ['flat_delta_uv', 'flat_delta_uv_stderr'] : [])],
    rows: d.bandCentersDeg.map((deg, i) => [
      deg, d.deltaUv[i] ?? null, d.deltaUvStdErr[i] ?? null, ...(f ? [f.deltaUv[i] ?? null, f.deltaUvStdErr[i] ?? null] : []),
    ]),
  }
}

/** The spectra leaving at the engine's chosen angles (each normalised to its own peak), flat device dashed. */
export function spectraOption(cs: Colours): Record<string, unknown> {
  const d = cs.device, f = cs.flat
  const nm = d.wavelengthCentersNm
  const line = (c: ColourResult, k: number, flat: boolean) => ({
    name: `${flat ? 'flat ' : ''}${c.spectra.anglesDeg[k]}°`, type: 'line', showSymbol: false, data: nm.map((w, i) => [w, c.spectra.relative[k]![i] ?? null]),
    lineStyle: { color: flat ? LAGOON : SPECTRUM_SHADES[k % SPECTRUM_SHADES.length], width: flat ? 1 : 2, type: flat ? 'dashed' : 'solid', opacity: flat ? 0.5 + 0.5 * (1 - k / Math.max(1, c.spectra.anglesDeg.length)) : 1 },
    itemStyle: { color: flat ? LAGOON : SPECTRUM_SHADES[k % SPECTRUM_SHADES.length] },
  })
  return {
    animation: false,
    grid: { left: 56, right: 16, top: 36, bottom: 64 },
    legend: { bottom: 0 },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => (v === null ? '—' : v.toFixed(3)) },
    // the bins' outer edges (380–780 nm), not their centres
    xAxis: { type: 'value', min: nm[0]! - d.wavelengthBinNm / 2, max: nm[nm.length - 1]! + d.wavelengthBinNm / 2, name: 'λ (nm)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'relative spectral power (peak = 1)', nameTextStyle: { align: 'left' }, min: 0 },
    series: [...d.spectra.anglesDeg.map((_, k) => line(d, k, false)), ...(f ? f.spectra.anglesDeg.map((_, k) => line(f, k, true)) : [])],
  }
}

export function spectraCsv(cs: Colours) {
  const d = cs.device, f = cs.flat
  return {
    header: ['wavelength_nm', ...d.spectra.anglesDeg.map((a) => `relative_at_${a}_deg`), ...(f ? f.spectra.anglesDeg.map((a) => `flat_relative_at_${a}_deg`) : [])],
    rows: d.wavelengthCentersNm.map((w, i) => [w, ...d.spectra.relative.map((s) => s[i] ?? null), ...(f ? f.spectra.relative.map((s) => s[i] ?? null) : [])]),
  }
}

/**
 * Radiometric luminance per band from the 1° bins (mean of the bins inside the band, σ of the mean of independent
 * bins), so it sits on the same angles as the photopic curve.
 */
export function radiometricPerBand(r: Pick<TraceResult, 'luminance' | 'intensity'>, c: ColourResult): { value: Array<number | null>; stdErr: Array<number | null> } {
  const th = r.intensity.thetaCentersDeg
  const value: Array<number | null> = [], stdErr: Array<number | null> = []
  for (const center of c.bandCentersDeg) {
    const lo = center - c.bandWidthDeg / 2, hi = center + c.bandWidthDeg / 2
    const idx = th.map((t, i) => (t >= lo && t < hi ? i : -1)).filter((i) => i >= 0)
    if (!idx.length) { value.push(null); stdErr.push(null); continue }
    value.push(idx.reduce((s, i) => s + r.luminance.relative[i]!, 0) / idx.length)
    stdErr.push(Math.sqrt(idx.reduce((s, i) => s + r.luminance.relativeStdErr[i]! ** 2, 0)) / idx.length)
  }
  return { value, stdErr }
}

/** Photopic relative luminance per band beside the radiometric one (both L/L Lambertian of the same launched flux). */
export function photopicOption(r: Pick<TraceResult, 'luminance' | 'intensity'>, cs: Colours): Record<string, unknown> {
  const d = cs.device, f = cs.flat
  const deg = d.bandCentersDeg
  const rad = radiometricPerBand(r, d)
  return {
    animation: false,
    grid: { left: 56, right: 16, top: 36, bottom: 64 },
    legend: { bottom: 0, data: ['photopic, this design', 'radiometric, this design', ...(f ? ['photopic, flat device'] : [])] },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => (v === null || v === undefined ? '—' : v.toFixed(3)) },
    xAxis: { type: 'value', min: 0, max: 90, interval: 15, name: 'θ in air (°)', nameLocation: 'middle', nameGap: 26 },
    yAxis: { type: 'value', name: 'L / L Lambertian (1)', nameTextStyle: { align: 'left' }, min: 0 },
    series: [
      ...band('photopic', deg, d.photopicRelative, d.photopicRelativeStdErr, 'rgba(217,137,43,0.25)', 'ph'),
      { name: 'photopic, this design', type: 'line', showSymbol: false, data: deg.map((t, i) => [t, d.photopicRelative[i] ?? null]), lineStyle: { color: EMBER, width: 2 }, itemStyle: { color: EMBER } },
      { name: 'radiometric, this design', type: 'line', showSymbol: false, data: deg.map((t, i) => [t, rad.value[i]]), lineStyle: { color: INK, width: 1, type: 'dashed' }, itemStyle: { color: INK } },
      ...(f ? [{ name: 'photopic, flat device', type: 'line', showSymbol: false, data: f.bandCentersDeg.map((t, i) => [t, f.photopicRelative[i] ?? null]), lineStyle: { color: LAGOON, width: 1.5 }, itemStyle: { color: LAGOON } }] : []),
    ],
  }
}

export function photopicCsv(r: Pick<TraceResult, 'luminance' | 'intensity'>, cs: Colours) {
  const d = cs.device, f = cs.flat
  const rad = radiometricPerBand(r, d)
  return {
    header: ['theta_deg', 'photopic_relative', 'photopic_relative_stderr', 'radiometric_relative', 'radiometric_relative_stderr', ...(f ? ['flat_photopic_relative', 'flat_photopic_relative_stderr'] : [])],
    rows: d.bandCentersDeg.map((deg, i) => [deg, d.photopicRelative[i] ?? null, d.photopicRelativeStdErr[i] ?? null, rad.value[i]!, rad.stdErr[i]!,
      ...(f ? [f.photopicRelative[i] ?? null, f.photopicRelativeStdErr[i] ?? null] : [])]),
  }
}
