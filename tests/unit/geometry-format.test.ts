// Displayed geometry (shared/utils/geometry-format.ts): lengths to 0.01 µm, ratios to 3 significant digits, angles
// to 0.1° (digits kept), while the value itself is never changed. Reference values: spherical cap Rc = (r² + h²)/(2h)
// and contact angle asin(r/Rc) (standard geometry); hexagonal close packing fill factor π/(2√3) = 0.9069 (standard
// geometry).
import { describe, expect, it } from 'vitest'
import { angleDeg, axisValue, geometry, lengthUm, ratio } from '../../shared/utils/geometry-format'
import { limitBreaches } from '../../shared/types/project'

describe('geometry as shown', () => {
  it('lengths to 0.01 µm, with their two decimals', () => {
    expect(lengthUm(4.392779454942249)).toBe('4.39 µm') // the sag bound of the issue, D/2 of an 8.7856 µm cap
    expect(lengthUm(4.396)).toBe('4.40 µm')
    expect(lengthUm(10)).toBe('10.00 µm')
    expect(lengthUm(9.5)).toBe('9.50 µm')
    expect(lengthUm(0.004)).toBe('0.00 µm')
    expect(lengthUm(-0.001)).toBe('0.00 µm') // no "-0.00"
    expect(lengthUm(123.456, false)).toBe('123.46')
  })

  it('a spherical cap D = 10 µm, h = 3 µm: Rc = 5.666… µm → "5.67 µm", contact angle 61.93° → "61.9°"', () => {
    const r = 5, h = 3
    const rc = (r * r + h * h) / (2 * h)
    expect(lengthUm(rc)).toBe('5.67 µm')
    expect(angleDeg((Math.asin(r / rc) * 180) / Math.PI)).toBe('61.9°')
    expect(rc).toBeCloseTo(5.6667, 4) // the stored value is untouched
  })

  it('ratios to 3 significant digits', () => {
    expect(ratio(Math.PI / (2 * Math.sqrt(3)))).toBe('0.907')
    expect(ratio(0.5)).toBe('0.500')
    expect(ratio(0.30000000000000004)).toBe('0.300')
    expect(ratio(-0.0001)).toBe('-0.000100')
    expect(ratio(12.345)).toBe('12.3')
    expect(ratio(0)).toBe('0')
  })

  it('dispatch by unit, and a dash for no value', () => {
    expect(geometry(7.123456, 'µm')).toBe('7.12 µm')
    expect(geometry(7.123456, 'µm', false)).toBe('7.12')
    expect(geometry(53.1301, '°')).toBe('53.1°')
    expect(geometry(0.90689, '')).toBe('0.907')
    expect(geometry(null, 'µm')).toBe('—')
    expect(lengthUm(Number.NaN)).toBe('—')
    expect(angleDeg(undefined)).toBe('—')
  })

  it('sweep coordinates: geometry axes round as geometry, an index keeps 4 significant digits', () => {
    expect(axisValue('lensArray.radiusOfCurvatureUm', 6.960000000000001, 'µm')).toBe('6.96 µm')
    expect(axisValue('lensArray.fillFactor', 0.7500000001, '', false)).toBe('0.750')
    expect(axisValue('substrate.index', 1.5168, '')).toBe('1.517')
  })
})

describe('limit breaches say the numbers as shown', () => {
  it('to 0.01 µm and 3 digits, and finer only when the breach is finer than that', () => {
    const lens = { sagUm: 2.5311, diameterUm: 8.79, pitchUm: 10 }
    expect(limitBreaches(lens, { maxSagUm: 2, maxAspectRatio: 0.25, minGapUm: 1.5 })).toEqual(['sag 2.53 µm > 2.00 µm', 'aspect ratio h/D 0.288 > 0.250', 'gap 1.21 µm < 1.50 µm'])
    expect(limitBreaches({ sagUm: 2.0004, diameterUm: 10, pitchUm: 10 }, { maxSagUm: 2 })).toEqual(['sag 2.0004 µm > 2 µm'])
    expect(limitBreaches(lens, { maxSagUm: 3 })).toEqual([])
  })
})
