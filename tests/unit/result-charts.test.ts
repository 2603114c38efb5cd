// The cell-result and compare charts (app/utils/charts/result.ts, compare.ts) against results the engine traces here
// (few rays), so every builder reads the contract's real shape.
import { describe, expect, it } from 'vitest'
import { traceScenario } from '../../shared/optics'
import { resultSchema } from '../../shared/types/result'
import { scenarioSchema } from '../../shared/types/scenario'
import { PALETTE, SERIES_COLOURS } from '../../app/utils/palette'
import { NEAR_AXIS_POOL_DEG, bandSolidAngleSr } from '../../app/utils/resultMath'
import {
  flatOverlay, intensityMapCsv, intensityMapOption, lambertianSameFlux, lambertianShare, lossCsv, lossOption, lossRows, luminanceCsv,
  luminanceOption, polarIntensityCsv, polarIntensityOption, pooledCurve, pooledOnAxisIntensity, type CellResult,
} from '../../app/utils/charts/result'
import { compareColour, compareCurveCsv, compareCurveOption } from '../../app/utils/charts/compare'
import type { ChartPoint } from '../../app/utils/charts/points'

const hex = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 20_000, seed: 11, fresnel: 'averaged', maxEvents: 10_000 },
}
const quadrature = traceScenario(scenarioSchema.parse(hex)) as CellResult
const traced = traceScenario(scenarioSchema.parse(hex), { companion: 'traced' }) as CellResult
const planar = traceScenario(scenarioSchema.parse({ ...hex, lensArray: null })) as CellResult
type Series = Array<{
  name: string; data: unknown[]; lineStyle?: { color?: string }; itemStyle?: { color?: string }; markLine?: { data: Array<{ xAxis: number }> }
}>
const series = (o: object) => (o as { series: Series }).series

describe('the traced fixtures', () => {
  it('parse with resultSchema and carry the companion methods asked for', () => {
    for (const r of [quadrature, traced, planar]) expect(resultSchema.safeParse(r).success).toBe(true)
    expect(quadrature.planar.method).toBe('quadrature')
    expect(traced.planar.method).toBe('traced')
  })
})

describe('Lambertian reference and pooling', () => {
  it('η cos θ / π over the hemisphere (2π sin θ dθ, midpoint rule on 0.1° steps) integrates to η (Lambert\'s cosine law)', () => {
    const theta = Array.from({ length: 900 }, (_, i) => 0.05 + 0.1 * i)
    const I = lambertianSameFlux(theta, 0.4)
    const flux = I.reduce((s, v, i) => s + v * 2 * Math.PI * Math.sin((theta[i]! * Math.PI) / 180) * ((0.1 * Math.PI) / 180), 0)
    expect(flux).toBeCloseTo(0.4, 5)
  })
  it('Lambertian shares of the 1° bands sum to 1 over 0–90° (sin²90° − sin²0°)', () => {
    const sum = Array.from({ length: 90 }, (_, b) => lambertianShare(b, b + 1)).reduce((a, b) => a + b, 0)
    expect(sum).toBeCloseTo(1, 12)
  })
  it('pools the near-axis bins into the density of their summed counts and leaves the others', () => {
    const theta = quadrature.intensity.thetaCentersDeg
    const vals = quadrature.intensity.perSteradian, errs = quadrature.intensity.perSteradianStdErr
    const p = pooledCurve(theta, vals, errs, bandSolidAngleSr)
    // per-ray intensity × band solid angle = share of rays in the band; pooled = Σ shares / Σ solid angles
    const shares = vals.slice(0, NEAR_AXIS_POOL_DEG).reduce((s, v, b) => s + v * bandSolidAngleSr(b, b + 1), 0)
    expect(p.value).toBeCloseTo(shares / bandSolidAngleSr(0, NEAR_AXIS_POOL_DEG), 12)
    expect(p.curve.slice(0, NEAR_AXIS_POOL_DEG).every((v) => v === p.value)).toBe(true)
    expect(p.curve.slice(NEAR_AXIS_POOL_DEG)).toEqual(vals.slice(NEAR_AXIS_POOL_DEG))
    expect(pooledOnAxisIntensity(quadrature)).toEqual(p)
  })
})

describe('intensity in air (half-disc)', () => {
  it('draws this design, the flat device and the Lambertian of the same flux, mirrored about the axis', () => {
    const o = polarIntensityOption(quadrature, flatOverlay(quadrature, false))
    const s = series(o)
    expect(s.map((x) => x.name)).toEqual(['this design', 'flat device (same stack, no lenses)', 'Lambertian, same extracted flux'])
    expect(s.map((x) => x.lineStyle!.color)).toEqual([PALETTE.ember[600], PALETTE.lagoon[600], PALETTE.ink.muted])
    const d = s[0]!.data as number[][]
    expect(d).toHaveLength(180)
    for (let i = 0; i < 90; i++) expect(d[89 - i]).toEqual([d[90 + i]![0], -d[90 + i]![1]!])
  })
  it('a planar design has no flat overlay (it is its own companion); a tooltip gives σ of this design only', () => {
    expect(flatOverlay(planar, true)).toBeNull()
    const o = polarIntensityOption(planar, null)
    expect(series(o)).toHaveLength(2)
    const fmt = (o.tooltip as { formatter: (p: ChartPoint) => string }).formatter
    const th = 30.5, i = 30
    const own = fmt({ seriesName: 'this design', seriesIndex: 0, dataIndex: 0, value: [planar.intensity.perSteradian[i]!, th], data: null })
    expect(own).toContain(`± ${planar.intensity.perSteradianStdErr[i]!.toExponential(1)} sr⁻¹`)
    const lam = fmt({ seriesName: 'Lambertian', seriesIndex: 1, dataIndex: 0, value: [0.1, th], data: null })
    expect(lam).not.toContain('±')
  })
  it('the CSV has the flat device columns only when it is overlaid', () => {
    expect(polarIntensityCsv(quadrature, flatOverlay(quadrature, false)).header).toContain('flat_device_per_sr')
    const c = polarIntensityCsv(planar, null)
    expect(c.header).not.toContain('flat_device_per_sr')
    expect(c.rows).toHaveLength(90)
    expect(c.rows[10]![3]).toBeCloseTo((planar.extraction * Math.cos((planar.intensity.thetaCentersDeg[10]! * Math.PI) / 180)) / Math.PI, 15)
  })
})

describe('luminance against angle', () => {
  it('the ±σ band stacks L − σ and 2σ, and the half-luminance angle is marked', () => {
    const o = luminanceOption(quadrature, flatOverlay(quadrature, false))
    const [lo, band, own, flat] = series(o)
    const i = 40
    const L = quadrature.luminance.relative[i]!, E = quadrature.luminance.relativeStdErr[i]!
    expect((lo!.data[i] as number[])[1]).toBeCloseTo(L - E, 15)
    expect((band!.data[i] as number[])[1]).toBeCloseTo(2 * E, 15)
    expect((own!.data[i] as number[])[1]).toBe(L)
    const at = (deg: number | null) => series(luminanceOption({ ...quadrature, luminance: { ...quadrature.luminance, halfLuminanceAngleDeg: deg } }, null))[2]!
    expect(at(41.5).markLine!.data[0]!.xAxis).toBe(41.5)
    expect(at(null).markLine).toBeUndefined()
    expect(flat!.name).toBe('flat device')
    expect(luminanceCsv(quadrature).rows[i]).toEqual([quadrature.intensity.thetaCentersDeg[i], L, E])
  })
})

describe('θ–φ intensity map', () => {
  it('one item per bin, colour scale to the 99th percentile of the bins holding light', () => {
    const o = intensityMapOption(quadrature)
    const m = quadrature.intensity.map
    const d = series(o)[0]!.data as number[][]
    expect(d).toHaveLength(m.thetaBins * m.phiBins)
    const lit = m.perSteradian.filter((v) => v > 0).sort((a, b) => a - b)
    expect((o.visualMap as { max: number }).max).toBe(lit[Math.floor(0.99 * (lit.length - 1))])
    const csv = intensityMapCsv(quadrature)
    expect(csv.rows).toHaveLength(m.thetaBins * m.phiBins)
    const k = m.phiBins + 2
    expect(csv.rows[k]).toEqual([1, 2, 2 * m.phiBinWidthDeg, 3 * m.phiBinWidthDeg, m.perSteradian[k], m.perSteradianStdErr[k]])
  })
})

describe('where the light goes', () => {
  it('the channels of the design and of its flat device each sum to all emitted light (energy conservation)', () => {
    for (const r of [quadrature, traced]) {
      const rows = lossRows(r)
      expect(rows.reduce((s, l) => s + l.dev, 0)).toBeCloseTo(1, 9)
      expect(rows.reduce((s, l) => s + l.flat, 0)).toBeCloseTo(1, 9)
    }
  })
  it('a flat device by quadrature is exact (σ 0 off the extraction row); a traced one carries the binomial σ √(p(1−p)/N)', () => {
    const q = lossRows(quadrature).find((l) => l.k === 'reflector')!
    expect(q.flatErr).toBe(0)
    const t = lossRows(traced).find((l) => l.k === 'reflector')!
    expect(t.flatErr).toBeCloseTo(Math.sqrt((t.flat * (1 - t.flat)) / traced.rays), 15)
  })
  it('bars in per cent, the CSV in fractions', () => {
    const rows = lossRows(quadrature)
    const s = series(lossOption(rows))
    expect(s[0]!.data[0]).toBeCloseTo(quadrature.extraction * 100, 3)
    expect(lossCsv(rows).rows[0]).toEqual(['extracted', quadrature.extraction, quadrature.extractionStdErr,
      quadrature.planar.extraction, quadrature.planar.extractionStdErr])
  })
})

describe('compare page', () => {
  const items = [{ label: 'hex caps', result: quadrature }, { label: 'flat', result: planar }]
  it('one curve per item in the series colours, in the table\'s order', () => {
    const s = series(compareCurveOption(items, 'luminance'))
    expect(s.map((x) => x.name)).toEqual(['hex caps', 'flat'])
    expect(s.map((x) => x.lineStyle!.color)).toEqual([SERIES_COLOURS[0], SERIES_COLOURS[1]])
    expect(compareColour(1)).toBe(SERIES_COLOURS[1])
    expect((s[1]!.data[20] as number[])[1]).toBe(planar.luminance.relative[20])
    expect((series(compareCurveOption(items, 'intensity'))[0]!.data[20] as number[])[1]).toBe(quadrature.intensity.perSteradian[20])
  })
  it('CSV: θ, then value and σ of each item', () => {
    const c = compareCurveCsv(items, 'intensity')
    expect(c.header).toEqual(['theta_deg', 'hex caps (intensity)', 'hex caps (stderr)', 'flat (intensity)', 'flat (stderr)'])
    expect(c.rows[3]).toEqual([quadrature.intensity.thetaCentersDeg[3], quadrature.intensity.perSteradian[3], quadrature.intensity.perSteradianStdErr[3],
      planar.intensity.perSteradian[3], planar.intensity.perSteradianStdErr[3]])
    expect(compareCurveCsv([], 'luminance').rows).toEqual([])
  })
})
