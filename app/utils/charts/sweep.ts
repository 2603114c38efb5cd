// Chart options of the sweep page. Pure: rows and labels in, an ECharts option out, so the page keeps only state.
import { PALETTE } from '../palette'
import { num } from '#shared/utils/format'
import type { ChartPoint } from './points'

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
