import { describe, expect, it } from 'vitest'
import { fileName, fileNamePart } from '../../shared/utils/file-name'

describe('export file names keep units and symbols (common practice: ASCII file names)', () => {
  it('spells units and symbols and keeps a number with its unit', () => {
    expect(fileNamePart('Hex hemispheres, 10 µm')).toBe('Hex-hemispheres-10um')
    expect(fileNamePart('Intensity map over θ and φ')).toBe('Intensity-map-over-theta-and-phi')
    expect(fileNamePart('θ–φ map')).toBe('theta-phi-map')
    expect(fileNamePart('radius of curvature × fill factor')).toBe('radius-of-curvature-x-fill-factor')
    expect(fileNamePart('sag ≤ 5 µm, 30°')).toBe('sag-le-5um-30deg')
  })
  it('the micro sign and the Greek mu both become u', () => {
    expect(fileNamePart('\u00b5m')).toBe('um')
    expect(fileNamePart('\u03bcm')).toBe('um')
  })
  it('drops accents, never returns an empty name, joins parts with _', () => {
    expect(fileNamePart('Müller café')).toBe('Muller-cafe')
    expect(fileNamePart('///')).toBe('lensfield')
    expect(fileName('Hex hemispheres 10 µm: first look', 'cell 0', 'Intensity in air')).toBe('Hex-hemispheres-10um-first-look_cell-0_Intensity-in-air')
    expect(fileName('a', 'b')).toMatch(/^[A-Za-z0-9._-]+$/)
  })
})
