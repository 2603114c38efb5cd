// The colour charts (app/utils/charts/colour.ts, cieLocus.ts) against a result of the contract's shape
// (tests/fixtures/colour-result.ts: traced base, invented colour numbers).
import { existsSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { resultSchema } from '../../shared/types/result'
import { SPECTRAL_LOCUS_XY } from '../../app/utils/charts/cieLocus'
import {
  chromaticityCsv, chromaticityOption, colourBlocks, deltaUvCsv, deltaUvOption, photopicCsv, photopicOption, radiometricPerBand,
  spectraCsv, spectraOption, trajectory, TRAJECTORY_MAX_DEG,
} from '../../app/utils/charts/colour'
import { colourResultFixture } from '../fixtures/colour-result'

const r = colourResultFixture()
const cs = colourBlocks(r)!
const series = (o: Record<string, unknown>) => o.series as Array<{ name: string; data: unknown[] }>

describe('the colour fixture', () => {
  it('parses with resultSchema (the contract the engine writes)', () => {
    expect(resultSchema.safeParse(r).success).toBe(true)
    expect(r.colour!.bandCentersDeg).toHaveLength(45)
  })
})

describe('spectral locus (CIE 1931 2°)', () => {
  it('every point is a chromaticity (x, y ≥ 0, x + y ≤ 1) and the wavelengths run 380–700 nm in 5 nm steps', () => {
    SPECTRAL_LOCUS_XY.forEach(([nm, x, y], i) => {
      expect(nm).toBe(380 + 5 * i)
      expect(x).toBeGreaterThanOrEqual(0)
      expect(y).toBeGreaterThanOrEqual(0)
      expect(x + y).toBeLessThanOrEqual(1)
    })
  })
  it('the locus peaks in y at 520 nm and dips to its smallest x at 505 nm (shape of the CIE 1931 diagram)', () => {
    const top = SPECTRAL_LOCUS_XY.reduce((a, b) => (b[2] > a[2] ? b : a))
    const left = SPECTRAL_LOCUS_XY.reduce((a, b) => (b[1] < a[1] ? b : a))
    expect(top[0]).toBe(520)
    expect(left[0]).toBe(505)
  })
  // The engine's colour-matching functions (x = x̄/(x̄ + ȳ + z̄)), once the engine carries them: the same CIE table.
  const cmfFile = new URL('../../shared/optics/cie1931.ts', import.meta.url)
  it.skipIf(!existsSync(cmfFile))('agrees with the chromaticity of the engine\'s CIE 1931 colour-matching functions to 2e-4', async () => {
    const cie = await import(/* @vite-ignore */ cmfFile.href) as { CIE_X: Float64Array; CIE_Y: Float64Array; CIE_Z: Float64Array }
    for (const [nm, x, y] of SPECTRAL_LOCUS_XY) {
      const i = (nm - 380) / 5
      const s = cie.CIE_X[i]! + cie.CIE_Y[i]! + cie.CIE_Z[i]!
      expect(Math.abs(cie.CIE_X[i]! / s - x), `x at ${nm} nm`).toBeLessThan(2e-4)
      expect(Math.abs(cie.CIE_Y[i]! / s - y), `y at ${nm} nm`).toBeLessThan(2e-4)
    }
  })
  it('equal-energy white (1/3, 1/3) lies inside the closed locus (ray-casting point-in-polygon)', () => {
    const poly = SPECTRAL_LOCUS_XY.map(([, x, y]) => [x, y] as const)
    let inside = false
    for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
      const [xi, yi] = poly[i]!, [xj, yj] = poly[j]!
      if ((yi > 1 / 3) !== (yj > 1 / 3) && 1 / 3 < ((xj - xi) * (1 / 3 - yi)) / (yj - yi) + xi) inside = !inside
    }
    expect(inside).toBe(true)
  })
})

describe('colour chart builders', () => {
  it('the trajectory runs from the first band to the last band at or below 80°, skipping bands without rays', () => {
    const t = trajectory(cs.device)
    expect(t[0]![0]).toBe(1)
    expect(t[t.length - 1]![0]).toBe(79)
    expect(t.every(([d]) => d <= TRAJECTORY_MAX_DEG)).toBe(true)
    const empty = structuredClone(cs.device); empty.x[10] = null
    expect(trajectory(empty)).toHaveLength(t.length - 1)
  })

  it('chromaticity: locus closed by the purple line, device and flat trajectories; zoom fits the trajectories', () => {
    const o = chromaticityOption(cs)
    const s = series(o)
    const locus = s.find((x) => x.name === 'spectral locus')!.data as number[][]
    expect(locus[0]).toEqual(locus[locus.length - 1])
    expect(s.map((x) => x.name)).toEqual(expect.arrayContaining(['this design', 'flat device']))
    const z = chromaticityOption(cs, { zoom: true }) as { xAxis: { min: number; max: number } }
    const xs = trajectory(cs.device).map((p) => p[1])
    expect(z.xAxis.min).toBeLessThanOrEqual(Math.min(...xs))
    expect(z.xAxis.max).toBeGreaterThanOrEqual(Math.max(...xs))
    expect(z.xAxis.max - z.xAxis.min).toBeLessThan(0.1)
    expect(chromaticityCsv(cs).rows).toHaveLength(45)
  })

  it('a planar design has no flat copy', () => {
    const own = colourBlocks(r, true)!
    expect(series(chromaticityOption(own)).some((x) => x.name === 'flat device')).toBe(false)
    expect(deltaUvCsv(own).header).toEqual(['theta_deg', 'delta_uv', 'delta_uv_stderr'])
    expect(colourBlocks({ colour: null, planarColour: null })).toBeNull()
  })

  it('Δu′v′: σ band as lower edge + width 2σ, nulls kept as gaps', () => {
    const s = series(deltaUvOption(cs))
    const lower = s.find((x) => x.name === 'this design −σ')!.data as Array<[number, number | null]>
    const width = s.find((x) => x.name === 'this design ±σ')!.data as Array<[number, number | null]>
    expect(lower[5]![1]).toBeCloseTo(cs.device.deltaUv[5]! - cs.device.deltaUvStdErr[5]!, 12)
    expect(width[5]![1]).toBeCloseTo(2 * cs.device.deltaUvStdErr[5]!, 12)
    expect(lower[44]![1]).toBeNull()
    expect(deltaUvCsv(cs).rows[44]).toEqual([89, null, null, null, null])
  })

  it('spectra: one curve per angle for the device and the flat device', () => {
    const s = series(spectraOption(cs))
    expect(s.map((x) => x.name)).toEqual(['0°', '30°', '60°', 'flat 0°', 'flat 30°', 'flat 60°'])
    expect(spectraCsv(cs).rows).toHaveLength(80)
  })

  it('photopic beside radiometric: the radiometric band value is the mean of its 1° bins', () => {
    const rad = radiometricPerBand(r, cs.device)
    // band 1 spans 2–4°: bins centred 2.5° and 3.5°
    const i2 = r.intensity.thetaCentersDeg.indexOf(2.5)
    expect(rad.value[1]).toBeCloseTo((r.luminance.relative[i2]! + r.luminance.relative[i2 + 1]!) / 2, 12)
    expect(rad.stdErr[1]).toBeCloseTo(Math.hypot(r.luminance.relativeStdErr[i2]!, r.luminance.relativeStdErr[i2 + 1]!) / 2, 12)
    expect(series(photopicOption(r, cs)).map((x) => x.name)).toEqual(expect.arrayContaining(['photopic, this design', 'radiometric, this design', 'photopic, flat device']))
    expect(photopicCsv(r, cs).rows).toHaveLength(45)
  })
})
