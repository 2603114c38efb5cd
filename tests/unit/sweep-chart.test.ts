// The sweep page's line chart option (app/utils/charts/sweep.ts): the ±2σ band is the value ± 2 standard errors,
// scaled like the plotted figure; points carry their cell index for the click.
import { describe, expect, it } from 'vitest'
import { sweepLineOption } from '../../app/utils/charts/sweep'
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
