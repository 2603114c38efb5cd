// The sweep page's chart options (app/utils/charts/sweep.ts). Line chart: the ±2σ band is the value ± 2 standard errors,
// scaled like the plotted figure; points carry their cell index for the click.
import { describe, expect, it } from 'vitest'
import { sweepHeatOption, sweepLineOption } from '../../app/utils/charts/sweep'
import { PALETTE } from '../../app/utils/palette'
import { pctErr } from '../../shared/utils/format'

describe('sweep line chart', () => {
  const rows = [
    { cellIndex: 0, coordinates: [4], status: 'done', value: 0.3, stdErr: 0.01, reason: null },
    { cellIndex: 1, coordinates: [5], status: 'infeasible', value: null, stdErr: null, reason: 'sag above D/2' },
  ]
  const opt = sweepLineOption(rows, 'Radius (µm)', { label: 'Extraction (%)', scale: 100, fmt: pctErr })
  it('plots value, value + 2σ and value − 2σ in display units, null where a cell has no value', () => {
    const [line, upper, lower] = opt.series as Array<{ data: Array<Array<number | null>> }>
    expect(line!.data).toEqual([[4, 30, 0], [5, null, 1]])
    expect(upper!.data[0]![1]).toBeCloseTo(32, 12)
    expect(lower!.data[0]![1]).toBeCloseTo(28, 12)
    expect(upper!.data[1]![1]).toBeNull()
  })
  it('the tooltip names the axis value and the figure with its σ, or why the cell is infeasible', () => {
    const f = opt.tooltip.formatter
    expect(f([{ dataIndex: 0, value: [], data: null }])).toBe('Radius (µm): 4<br>30.0 ± 1.0 %')
    expect(f([{ dataIndex: 1, value: [], data: null }])).toBe('Radius (µm): 5<br>infeasible: sag above D/2')
  })
})

describe('sweep heat map', () => {
  const fig = { label: 'Gain over flat (×)', scale: 1, fmt: (v: number | null, e: number | null) => `${v} ± ${e}` }
  const cell = (cellIndex: number, x: number, y: number, value: number | null, status = 'done', breaches: string[] = []) =>
    ({ cellIndex, coordinates: [x, y], status, value, stdErr: value === null ? null : 0.01, reason: status === 'infeasible' ? 'too steep' : null, breaches })
  const rows = [cell(0, 1, 1, 1.5), cell(1, 2, 1, 1.8, 'done', ['sag above 2 µm']), cell(2, 1, 2, null, 'running'), cell(3, 2, 2, null, 'infeasible')]
  type Item = { value: number[], cellIndex: number, itemStyle?: { borderColor: string, borderType?: string } }
  const series = (best: number | null) =>
    sweepHeatOption(rows, { axisLabels: ['x', 'y'], twoAxes: true, fig, unitMark: '×', bestCellIndex: best }).series as Array<{ data: Item[] }>

  it('places each cell at its axis values; marks the best only once it is final, and a broken limit dashed', () => {
    const [values, pending, crosses] = series(0)
    expect(values!.data.map((d) => [d.cellIndex, ...d.value])).toEqual([[0, 0, 0, 1.5], [1, 1, 0, 1.8]])
    expect(values!.data[0]!.itemStyle?.borderColor).toBe(PALETTE.ember[500])
    expect(values!.data[1]!.itemStyle).toEqual({ borderColor: PALETTE.alert[500], borderWidth: 2, borderType: 'dashed' })
    expect(series(null)[0]!.data[0]!.itemStyle).toBeUndefined()
    expect(pending!.data.map((d) => d.cellIndex)).toEqual([2, 3])
    expect(crosses!.data.map((d) => d.cellIndex)).toEqual([3])
  })
})
