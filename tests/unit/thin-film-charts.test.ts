// The thin-film result charts (app/utils/charts/thinFilm.ts) on a result fixture that parses with resultSchema
// (tests/fixtures/thin-film-result.ts: a real sheet trace plus the reference green stack from the thin-film module).
// Each builder's option is also drawn by echarts itself (server-side SVG) with the components the chart panel loads.
import { beforeAll, describe, expect, it } from 'vitest'
import { init, use } from 'echarts/core'
import { SVGRenderer } from 'echarts/renderers'
import { BarChart, LineChart } from 'echarts/charts'
import { GridComponent, LegendComponent, MarkAreaComponent, TooltipComponent } from 'echarts/components'
import { resultSchema, type ThinFilmResult, type TraceResult } from '../../shared/types/result'
import {
  dissipationCsv, dissipationOption, dissipationRegions, glassEmissionCsv, glassEmissionOption, MODE_CHANNELS, modeSplitCsv, modeSplitOption,
} from '../../app/utils/charts/thinFilm'
import { thinFilmResultFixture } from '../fixtures/thin-film-result'

use([SVGRenderer, BarChart, LineChart, GridComponent, LegendComponent, MarkAreaComponent, TooltipComponent])

let result: TraceResult
let tf: ThinFilmResult
beforeAll(() => {
  result = thinFilmResultFixture()
  tf = result.thinFilm!
})

function drawn(option: Record<string, unknown>): string {
  const chart = init(null, null, { renderer: 'svg', ssr: true, width: 640, height: 380 })
  chart.setOption(option)
  const svg = chart.renderToSVGString()
  chart.dispose()
  return svg
}
interface Series { name: string; data: any[]; markArea?: { data: Array<[{ name: string; xAxis: number }, { xAxis: number }]> } }
const series = (o: Record<string, unknown>) => o.series as Series[]

describe('the fixture', () => {
  it('parses with resultSchema and carries the thin-film block and stackAbsorbed', () => {
    expect(resultSchema.safeParse(result).success).toBe(true)
    expect(tf.dissipation.u.length).toBe(tf.dissipation.mixed.length)
    expect(result.losses.stackAbsorbed).toBeGreaterThan(0)
  })
})

describe('power dissipation spectrum', () => {
  it('shades air, glass, waveguide and evanescent regions at uAir = 1/n_e, uGlass = n_g/n_e and u = 1', () => {
    const r = dissipationRegions(tf.dissipation)
    // n_e = 1.75 (the reference stack's EML), n_g = 1.5
    expect(r.map((x) => [x.key, x.from, x.to])).toEqual([
      ['air', 0, 1 / 1.75], ['glass', 1 / 1.75, 1.5 / 1.75], ['waveguided', 1.5 / 1.75, 1], ['evanescent', 1, 1.6],
    ])
    // the end rounds up to 0.1 (u grid to 1.9975 → 2)
    expect(dissipationRegions({ ...tf.dissipation, u: [0, 0.5, 1.9975] }).at(-1)!.to).toBe(2)
    const mixed = series(dissipationOption(tf))[3]!
    expect(mixed.markArea!.data.map((d) => [d[0].name, d[0].xAxis, d[1].xAxis])).toEqual(r.map((x) => [x.label, x.from, x.to]))
  })

  it('plots TE-h, TM-h, TM-v and the mix on a log axis, leaving out K ≤ 0 (K = 0 at u = 0)', () => {
    const o = dissipationOption(tf)
    const y = o.yAxis as { type: string; min: number; max: number }
    expect(y.type).toBe('log')
    // up to the decade above the highest K; down to three decades below the mix's median decade
    const peak = Math.max(...tf.dissipation.teHorizontal, ...tf.dissipation.tmHorizontal, ...tf.dissipation.tmVertical, ...tf.dissipation.mixed)
    expect(y.max).toBeGreaterThanOrEqual(peak)
    expect(y.max / 10).toBeLessThan(peak)
    const pos = tf.dissipation.mixed.filter((k) => k > 0).sort((a, b) => a - b)
    expect(y.min).toBeCloseTo(10 ** (Math.floor(Math.log10(pos[Math.floor(pos.length / 2)]!)) - 3), 12)
    expect(y.min).toBeGreaterThan(1e-5)
    const s = series(o)
    expect(s.map((x) => x.name)).toEqual(['TE, horizontal', 'TM, horizontal', 'TM, vertical', 'mixed (Θ = 0.667)'])
    expect(s[3]!.data[0]).toEqual([0, null])
    expect(s[0]!.data[10]).toEqual([tf.dissipation.u[10], tf.dissipation.teHorizontal[10]])
    // the mix is Θ·(TE,h + TM,h) + (1 − Θ)·TM,v (Furno et al., Phys. Rev. B 85, 115205 (2012), eq. for K)
    const th = tf.horizontalDipoleFraction, d = tf.dissipation
    for (const i of [25, 150, 300]) expect(d.mixed[i]).toBeCloseTo(th * (d.teHorizontal[i]! + d.tmHorizontal[i]!) + (1 - th) * d.tmVertical[i]!, 12)
  })

  it('echarts draws it with the region names; the CSV has one row per u with its region', () => {
    const svg = drawn(dissipationOption(tf))
    for (const w of ['>air<', '>glass<', '>guided<', 'evanescent / plasmon', 'TM, vertical']) expect(svg).toContain(w)
    const csv = dissipationCsv(tf)
    expect(csv.rows).toHaveLength(tf.dissipation.u.length)
    expect(csv.rows[0]!.at(-1)).toBe('air')
    expect(csv.rows.at(-1)!.at(-1)).toBe('evanescent')
  })
})

describe('mode split, flat vs film', () => {
  it('one stacked bar each, the channels in order, each bar summing to 100 % of the dipole power', () => {
    const o = modeSplitOption(tf)
    const s = series(o)
    expect(s.map((x) => x.name)).toEqual(MODE_CHANNELS.map((c) => c[1]))
    for (const bar of [0, 1]) {
      // the flat split is the module's exact one: its five shares add up to all the dipole power (energy balance,
      // a metal cathode sends nothing out of the top)
      const total = s.reduce((a, x) => a + x.data[bar], 0)
      expect(Math.abs(total - 100)).toBeLessThan(1e-3)
    }
    expect(s[0]!.data[0]).toBeCloseTo(tf.modes.flat.air * 100, 3)
    expect(drawn(o)).toContain('with the film (traced)')
  })

  it('the CSV keeps fractions and the film\'s σ for air and glass', () => {
    const csv = modeSplitCsv(tf)
    expect(csv.header).toEqual(['channel', 'flat_fraction', 'film_fraction', 'film_fraction_stderr'])
    expect(csv.rows[0]).toEqual(['air', tf.modes.flat.air, tf.modes.film.air, tf.modes.film.airStdErr])
    expect(csv.rows[4]![3]).toBeNull()
  })
})

describe('angular emission into the glass', () => {
  it('s, p and their sum against θ in the glass; at normal incidence s and p agree (no distinction of the planes)', () => {
    const o = glassEmissionOption(tf)
    const s = series(o)
    expect(s.map((x) => x.name)).toEqual(['s-polarised', 'p-polarised', 's + p'])
    expect(s[2]!.data[30]![1]).toBeCloseTo(tf.glassEmission.s[30]! + tf.glassEmission.p[30]!, 14)
    // at θ = 0 the s and p planes are not distinct: horizontal dipoles give both the same power and vertical ones
    // none on axis (Lukosz & Kunz, JOSA 67, 1607 (1977); from memory), so s = p within the module's accuracy
    expect(Math.abs(tf.glassEmission.s[0]! / tf.glassEmission.p[0]! - 1)).toBeLessThan(1e-3)
    expect(drawn(o)).toContain('θ in the glass')
    expect(glassEmissionCsv(tf).rows).toHaveLength(90)
  })
})
