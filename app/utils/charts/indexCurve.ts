// n(λ) (and k(λ) for an n,k table) of one material over the wavelengths the design's spectrum spans, for the
// editor's material field. A line spectrum spans one wavelength: the plot then shows ±100 nm around it with the
// line marked, so the dispersion near it is still readable.
import { extinctionAt, indexAt, type IndexModel } from '#shared/types/scenario'
import { PALETTE } from '../palette'

const EMBER = PALETTE.ember[600], LAGOON = PALETTE.lagoon[600], MUTED = PALETTE.ink.muted

export interface IndexCurve { nm: number[]; n: number[]; k: number[] | null; spanNm: [number, number]; lineNm: number | null }

/** n (and k for a table) at 121 wavelengths over the spectrum's span [lo, hi] nm (a line: ±100 nm, within 200–2500). */
export function indexCurve(model: IndexModel, rangeNm: [number, number], points = 121): IndexCurve {
  const line = rangeNm[1] - rangeNm[0] < 1e-9
  const lo = line ? Math.max(200, rangeNm[0] - 100) : rangeNm[0]
  const hi = line ? Math.min(2500, rangeNm[1] + 100) : rangeNm[1]
  const nm = Array.from({ length: points }, (_, i) => lo + ((hi - lo) * i) / (points - 1))
  const table = typeof model === 'object' && 'table' in model
  return {
    nm,
    n: nm.map((x) => indexAt(model, x)),
    k: table ? nm.map((x) => extinctionAt(model, x)) : null,
    spanNm: [lo, hi],
    lineNm: line ? rangeNm[0] : null,
  }
}

/** The echarts option of indexCurve: n on the left axis, k (tables only) on the right. */
export function indexCurveOption(c: IndexCurve): Record<string, unknown> {
  const finite = c.n.filter((v) => Number.isFinite(v))
  const nMin = finite.length ? Math.min(...finite) : 1, nMax = finite.length ? Math.max(...finite) : 2
  const pad = Math.max(1e-3, (nMax - nMin) * 0.1)
  return {
    animation: false,
    grid: { left: 56, right: c.k ? 56 : 16, top: 16, bottom: 40 },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => (Number.isFinite(v) ? v.toFixed(4) : '—') },
    xAxis: { type: 'value', min: Math.round(c.spanNm[0]), max: Math.round(c.spanNm[1]), name: 'λ (nm)', nameLocation: 'middle', nameGap: 24 },
    yAxis: [
      { type: 'value', name: 'n', min: Number((nMin - pad).toFixed(4)), max: Number((nMax + pad).toFixed(4)), splitNumber: 3, axisLabel: { formatter: (v: number) => v.toFixed(3) } },
      ...(c.k ? [{ type: 'value', name: 'k', position: 'right', splitLine: { show: false }, axisLabel: { formatter: (v: number) => v.toExponential(0) } }] : []),
    ],
    series: [
      {
        name: 'n', type: 'line', showSymbol: false, data: c.nm.map((x, i) => [x, Number.isFinite(c.n[i]!) ? c.n[i] : null]),
        lineStyle: { color: EMBER, width: 2 }, itemStyle: { color: EMBER },
        markLine: c.lineNm !== null ? { symbol: 'none', label: { formatter: `emission ${c.lineNm} nm` }, lineStyle: { color: MUTED, type: 'dotted' }, data: [{ xAxis: c.lineNm }] } : undefined,
      },
      ...(c.k ? [{ name: 'k', type: 'line', yAxisIndex: 1, showSymbol: false, data: c.nm.map((x, i) => [x, c.k![i]]), lineStyle: { color: LAGOON, type: 'dashed' }, itemStyle: { color: LAGOON } }] : []),
    ],
  }
}

/** The plotted values as CSV rows. */
export function indexCurveCsv(c: IndexCurve) {
  return {
    header: ['wavelength_nm', 'n', ...(c.k ? ['k'] : [])],
    rows: c.nm.map((x, i) => [x, Number.isFinite(c.n[i]!) ? c.n[i]! : null, ...(c.k ? [c.k[i]!] : [])]),
  }
}
