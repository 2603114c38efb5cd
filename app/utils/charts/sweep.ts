// Chart options of the sweep page. Pure: rows and labels in, an ECharts option out, so the page keeps only state.
import { num } from '#shared/utils/format'
import { labelColour } from '../sweepCells'
import { HEAT_RAMP, PALETTE } from '../palette'
import { cellIndexOf, type ChartPoint } from './points'

/** A grid point as the sweep charts read it (the page's SweepRow has more). */
export interface SweepLinePoint {
  cellIndex: number
  coordinates: number[]
  status: string
  value: number | null
  stdErr: number | null
  reason: string | null
}

/** How the sweep's figure is shown: axis name, display scale (100 for %), value ± σ text. */
export interface FigureDisplay {
  label: string
  scale: number
  fmt: (value: number | null, stdErr: number | null) => string
}

/**
 * A one-axis sweep: the figure over the axis with a dotted ±2σ band; each point carries its cell index third, so a
 * click opens that cell. rows must be sorted along the axis.
 */
export function sweepLineOption(rows: SweepLinePoint[], axisLabel: string, fig: FigureDisplay) {
  const at = (r: SweepLinePoint, k: number) => (r.value === null ? null : (r.value + k * (r.stdErr ?? 0)) * fig.scale)
  const band = (k: number) => ({
    type: 'line', showSymbol: false, data: rows.map((r) => [r.coordinates[0], at(r, k)]),
    lineStyle: { type: 'dotted', color: PALETTE.ember[500] }, tooltip: { show: false },
  })
  return {
    animation: false,
    grid: { left: 64, right: 24, top: 16, bottom: 56 },
    tooltip: {
      trigger: 'axis',
      formatter: (ps: ChartPoint[]) => {
        const r = rows[ps[0]!.dataIndex]!
        return `${axisLabel}: ${num(r.coordinates[0])}<br>${r.status === 'infeasible' ? `infeasible: ${r.reason}` : fig.fmt(r.value, r.stdErr)}`
      },
    },
    xAxis: { type: 'value', name: axisLabel, nameLocation: 'middle', nameGap: 32, scale: true },
    yAxis: { type: 'value', name: fig.label, scale: true },
    series: [
      { type: 'line', data: rows.map((r) => [r.coordinates[0], at(r, 0), r.cellIndex]), itemStyle: { color: PALETTE.ember[600] }, connectNulls: false },
      band(2),
      band(-2),
    ],
  }
}

/** A grid cell as the heat map reads it: a line point plus the project limits it breaks. */
export interface SweepHeatCell extends SweepLinePoint {
  breaches: string[]
}

const axisValues = (rows: SweepHeatCell[], i: number) => [...new Set(rows.map((r) => r.coordinates[i]!))].sort((a, b) => a - b)

/**
 * A two-axis sweep as a heat map of the figure (lagoon ramp), each cell labelled with its value; the best cell (only
 * once the sweep has ended: bestCellIndex) outlined in ember and starred, cells that break a project limit dashed in
 * alert red with ⚠, cells still tracing grey with …, infeasible cells crossed out. Items carry their cell index.
 */
export function sweepHeatOption(rows: SweepHeatCell[], opts: {
  axisLabels: string[], twoAxes: boolean, fig: FigureDisplay, unitMark: string, bestCellIndex: number | null,
  /** A coordinate as shown on axis `axis` (default 4 significant figures). */
  coord?: (axis: number, v: number) => string,
  /** The colour ramp, lightest to darkest = best (reversed by the page for a figure where lower is better). */
  ramp?: readonly string[],
}) {
  const { axisLabels, twoAxes, fig, unitMark, bestCellIndex } = opts
  const coord = opts.coord ?? ((_axis: number, v: number) => num(v))
  const ramp = opts.ramp ?? HEAT_RAMP
  const xs = axisValues(rows, 0), ys = twoAxes ? axisValues(rows, 1) : [0]
  const done = rows.filter((r) => r.value !== null && r.status !== 'infeasible')
  const vals = done.map((r) => r.value! * fig.scale)
  const lo = vals.length ? Math.min(...vals) : 0, hi = vals.length ? Math.max(...vals) : 1
  const cellAt = (r: SweepHeatCell) => [xs.indexOf(r.coordinates[0]!), twoAxes ? ys.indexOf(r.coordinates[1]!) : 0]
  return {
    animation: false,
    grid: { left: 80, right: 120, top: 16, bottom: 56 },
    tooltip: {
      formatter: (p: ChartPoint) => {
        const r = rows.find((x) => x.cellIndex === cellIndexOf(p))!
        const where = r.coordinates.map((c, i) => `${axisLabels[i]}: ${coord(i, c)}`).join('<br>')
        const over = r.breaches.length ? `<br><span style="color:${PALETTE.alert[500]}">breaks the project's limit: ${r.breaches.join('; ')}</span>` : ''
        const what = r.status === 'infeasible' ? `infeasible: ${r.reason}` : r.value === null ? r.status : `${fig.fmt(r.value, r.stdErr)}${r.status !== 'done' ? ` (${r.status})` : ''}`
        return `Cell ${r.cellIndex}<br>${where}<br><strong>${what}</strong>${over}`
      },
    },
    xAxis: { type: 'category', data: xs.map((v) => coord(0, v)), name: axisLabels[0], nameLocation: 'middle', nameGap: 32, splitArea: { show: true } },
    yAxis: { type: 'category', data: ys.map((v) => coord(1, v)), name: axisLabels[1] ?? '', nameLocation: 'middle', nameGap: 56, splitArea: { show: true } },
    visualMap: { min: lo, max: hi === lo ? lo + 1e-9 : hi, calculable: true, right: 0, top: 'center', seriesIndex: 0, text: [unitMark, ''], inRange: { color: [...ramp] }, formatter: (v: number) => v.toPrecision(3) },
    series: [
      {
        type: 'heatmap',
        data: done.map((r) => {
          const v = r.value! * fig.scale
          const isBest = r.cellIndex === bestCellIndex
          const ink = labelColour(hi === lo ? 0 : (v - lo) / (hi - lo), ramp)
          return {
            value: [...cellAt(r), v], cellIndex: r.cellIndex,
            label: { color: ink, textBorderColor: ink === PALETTE.paper.raised ? PALETTE.lagoon[800] : PALETTE.paper.raised, textBorderWidth: 2, fontWeight: isBest ? 'bold' : 'normal' },
            ...(isBest ? { itemStyle: { borderColor: PALETTE.ember[500], borderWidth: 4 } } : r.breaches.length ? { itemStyle: { borderColor: PALETTE.alert[500], borderWidth: 2, borderType: 'dashed' } } : {}),
          }
        }),
        label: {
          show: xs.length * ys.length <= 64,
          formatter: (p: ChartPoint) => {
            const r = rows.find((x) => x.cellIndex === cellIndexOf(p))
            const v = p.value[2]!.toPrecision(3)
            return `${bestCellIndex !== null && cellIndexOf(p) === bestCellIndex ? '★ ' : ''}${v}${r?.breaches.length ? ' ⚠' : ''}`
          },
        },
        emphasis: { itemStyle: { borderColor: PALETTE.ember[500], borderWidth: 2 } },
      },
      { type: 'heatmap', data: rows.filter((r) => r.value === null || r.status === 'infeasible').map((r) => ({ value: [...cellAt(r), 0], cellIndex: r.cellIndex })), itemStyle: { color: PALETTE.paper.sunk }, label: { show: true, formatter: (p: ChartPoint) => rows.find((x) => x.cellIndex === cellIndexOf(p))?.status === 'infeasible' ? '' : '…', color: PALETTE.ink.muted } },
      { type: 'scatter', symbol: 'path://M0,0 L10,10 M10,0 L0,10', symbolSize: 18, data: rows.filter((r) => r.status === 'infeasible').map((r) => ({ value: cellAt(r), cellIndex: r.cellIndex })), itemStyle: { color: PALETTE.alert[500], borderColor: PALETTE.alert[500], borderWidth: 2 }, label: { show: true, position: 'bottom', formatter: () => 'infeasible', color: PALETTE.alert[700], fontSize: 11 } },
    ],
  }
}
