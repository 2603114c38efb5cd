// Linked lens inputs of the design editor (app/utils/lensLink.ts): any two of D / h / Rc, fill factor ↔ D.
// Check values from standard geometry: spherical cap Rc = (r² + h²)/(2h),
// D 10 µm h 2.5 µm → Rc 6.250 µm, contact angle 53.13°; fill factor hexagonal π/(2√3)·(D/p)² = 0.9069·(D/p)²,
// square π/4·(D/p)² (Conway & Sloane, Sphere Packings, Lattices and Groups, ch. 1).
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { editLens, linkFromLens, setLattice } from '../../app/utils/lensLink'
import { contactAngleDeg } from '../../shared/types/geometry'

describe('linked lens inputs', () => {
  it('D and h give Rc: D 10 µm, h 2.5 µm → Rc 6.250 µm, 53.13° (standard geometry)', () => {
    const s = linkFromLens('hexagonal', 12, 10, 2.5)
    expect(s.radiusUm).toBeCloseTo(6.25, 10)
    expect(contactAngleDeg(s.diameterUm, s.sagUm)).toBeCloseTo(53.13, 2)
    expect(s.problem).toBeNull()
  })

  it('changing sag with D fixed changes Rc; hemisphere h = r gives Rc = r', () => {
    let s = linkFromLens('hexagonal', 10, 10, 2.5)
    s = editLens(s, 'sag', 5)
    expect(s.diameterUm).toBe(10)
    expect(s.radiusUm).toBeCloseTo(5, 12)
  })

  it('D and Rc give h: D 10 µm, Rc 6.25 µm → h 2.5 µm', () => {
    let s = linkFromLens('square', 12, 10, 4)
    s = editLens(s, 'radius', 6.25) // given now: radius, sag → D follows; then set D so given is D, radius
    s = editLens(s, 'diameter', 10)
    expect(s.given).toEqual(['diameter', 'radius'])
    expect(s.sagUm).toBeCloseTo(2.5, 10)
  })

  it('h and Rc give D: h 2.5 µm, Rc 6.25 µm → D 10 µm', () => {
    let s = linkFromLens('hexagonal', 12, 8, 1)
    s = editLens(s, 'sag', 2.5)
    s = editLens(s, 'radius', 6.25)
    expect(s.given).toEqual(['radius', 'sag'])
    expect(s.diameterUm).toBeCloseTo(10, 10)
  })

  it('Rc below D/2 is explained, not silently clamped', () => {
    let s = linkFromLens('hexagonal', 12, 10, 2.5)
    s = editLens(s, 'diameter', 10)
    s = editLens(s, 'radius', 4)
    expect(s.problem).toMatch(/below half the diameter/)
  })

  it('sag above Rc (more than a hemisphere) is explained', () => {
    let s = linkFromLens('hexagonal', 12, 10, 2.5)
    s = editLens(s, 'radius', 3)
    s = editLens(s, 'sag', 4)
    expect(s.problem).toMatch(/more than a hemisphere/)
  })

  it('fill factor ↔ D, hexagonal: D = p gives 0.9069; D/p = 0.5 gives 0.2267 (Conway & Sloane ch. 1)', () => {
    const s = linkFromLens('hexagonal', 10, 10, 2)
    expect(s.fillFactor).toBeCloseTo(0.9069, 4)
    const half = editLens(s, 'fill', 0.9069 * 0.25)
    expect(half.diameterUm).toBeCloseTo(5, 3)
    expect(half.given).toEqual(['fill', 'sag'])
  })

  it('fill factor ↔ D, square: D = p gives π/4 = 0.7854; a given fill factor survives a pitch change', () => {
    const s = linkFromLens('square', 10, 10, 2)
    expect(s.fillFactor).toBeCloseTo(0.7854, 4)
    let f = editLens(s, 'fill', 0.5)
    expect(f.diameterUm).toBeCloseTo(10 * Math.sqrt(0.5 / (Math.PI / 4)), 10)
    f = editLens(f, 'pitch', 20)
    expect(f.fillFactor).toBe(0.5)
    expect(f.diameterUm).toBeCloseTo(20 * Math.sqrt(0.5 / (Math.PI / 4)), 10)
  })

  it('a given fill factor keeps its value across a lattice switch; above the lattice maximum is explained', () => {
    const s = editLens(linkFromLens('hexagonal', 10, 8, 2), 'fill', 0.85)
    const sq = setLattice(s, 'square')
    expect(sq.fillFactor).toBe(0.85)
    expect(sq.problem).toMatch(/above the square maximum 0.7854/)
    expect(s.problem).toBeNull()
  })

  it('a given D keeps its value across a lattice switch and the fill factor follows', () => {
    const s = linkFromLens('hexagonal', 10, 8, 2)
    const sq = setLattice(s, 'square')
    expect(sq.diameterUm).toBe(8)
    expect(sq.fillFactor).toBeCloseTo((Math.PI / 4) * 0.64, 12)
  })

  it('D above the pitch is explained', () => {
    const s = editLens(linkFromLens('hexagonal', 10, 8, 2), 'diameter', 11)
    expect(s.problem).toMatch(/above the pitch/)
  })

  it('property: any pair entered reproduces the cap it came from (round trip)', () => {
    fc.assert(fc.property(
      fc.double({ min: 1, max: 100, noNaN: true }), fc.double({ min: 0.01, max: 1, noNaN: true }),
      fc.constantFrom<'hexagonal' | 'square'>('hexagonal', 'square'),
      (d, hFrac, lattice) => {
        const h = hFrac * d / 2
        const ref = linkFromLens(lattice, d * 1.2, d, h)
        const viaDR = editLens(editLens(ref, 'radius', ref.radiusUm), 'diameter', d)
        const viaHR = editLens(editLens(ref, 'sag', h), 'radius', ref.radiusUm)
        const viaFH = editLens(editLens(ref, 'sag', h), 'fill', ref.fillFactor)
        const tol = 1e-7 * d
        return Math.abs(viaDR.sagUm - h) < tol && Math.abs(viaHR.diameterUm - d) < 1e-5 * d
          && Math.abs(viaFH.diameterUm - d) < tol && Math.abs(viaFH.radiusUm - ref.radiusUm) < 1e-6 * ref.radiusUm
      },
    ))
  })

  it('negative, zero or empty (NaN) entries derive nothing and are named; the value typed is kept', () => {
    const base = linkFromLens('hexagonal', 10, 10, 5)
    const neg = editLens(base, 'sag', -2)
    expect(neg.sagUm).toBe(-2)
    expect(Number.isNaN(neg.radiusUm)).toBe(true)
    expect(neg.problem).toBe('Sag h must be above 0 µm: got -2 µm.')
    const zero = editLens(base, 'sag', 0)
    expect(zero.problem).toBe('Sag h must be above 0 µm: got 0 µm.')
    const d = editLens(base, 'diameter', -5)
    expect(d.diameterUm).toBe(-5)
    expect(Number.isNaN(d.fillFactor)).toBe(true)
    expect(d.problem).toMatch(/^Base diameter D must be above 0 µm/)
    const empty = editLens(base, 'radius', NaN)
    expect(empty.problem).toMatch(/^Radius of curvature Rc is empty or not a number/)
    expect(Number.isNaN(empty.diameterUm)).toBe(true) // Rc and h given: D follows from nothing
    expect(editLens(base, 'pitch', 0).problem).toMatch(/^Pitch must be above 0 µm/)
    // fixing the entry brings the derived values back (hemisphere: Rc = r)
    expect(editLens(neg, 'sag', 5)).toMatchObject({ problem: null, radiusUm: 5 })
  })
})
