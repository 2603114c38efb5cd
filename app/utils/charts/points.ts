// What ECharts hands a formatter or a click handler (its CallbackDataParams), narrowed to what Lensfield's charts
// put in their series: numeric value arrays ([x, y] or [x, y, v]) and, on the sweep maps, the cell's index.

/** One data item of a chart as ECharts passes it back. */
export interface ChartPoint {
  seriesName?: string
  seriesIndex?: number
  dataIndex: number
  value: number[]
  /** The item as given: an object carrying the sweep cell's index, or the bare value array. */
  data: { cellIndex?: number } | number[] | null
}

/** The sweep cell an item (or a clicked item, ECharts' ECElementEvent) stands for: heat-map items carry it as
 * cellIndex, line points as their third value. */
export function cellIndexOf(p: { data?: unknown } | null | undefined): number | undefined {
  const d = p?.data
  if (Array.isArray(d)) return typeof d[2] === 'number' ? d[2] : undefined
  if (d && typeof d === 'object' && 'cellIndex' in d && typeof d.cellIndex === 'number') return d.cellIndex
  return undefined
}
