import { describe, expect, it } from 'vitest'
import { scenarioSchema } from '../../shared/types/scenario'
import { axisProblems, axisValues, cellSeed, expandSweep, sweepRequestSchema } from '../../shared/types/sweep'

const base = scenarioSchema.parse({
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 100000, seed: 1, fresnel: 'averaged' },
})

describe('sweep axes', () => {
  it('spaces start/stop/steps evenly and ends exactly on stop', () => {
    expect(axisValues({ parameter: 'lensArray.sagUm', start: 1, stop: 2, steps: 3 })).toEqual([1, 1.5, 2])
    const v = axisValues({ parameter: 'lensArray.sagUm', start: 0.1, stop: 0.7, steps: 7 })
    expect(v[6]).toBe(0.7)
  })

  it('refuses values together with a range, and a missing range part, naming the field', () => {
    const r = sweepRequestSchema.safeParse({ designId: '00000000-0000-4000-8000-000000000000', axes: [{ parameter: 'lensArray.sagUm', values: [1], start: 1 }] })
    expect(r.success).toBe(false)
    expect(JSON.stringify(r.error!.issues[0]!.path)).toContain('values')
    const r2 = sweepRequestSchema.safeParse({ designId: '00000000-0000-4000-8000-000000000000', axes: [{ parameter: 'lensArray.sagUm', start: 1, stop: 2 }] })
    expect(r2.success).toBe(false)
    expect(r2.error!.issues.map((i) => i.path.join('.'))).toContain('axes.0.steps')
  })

  it('refuses an unknown parameter', () => {
    const r = sweepRequestSchema.safeParse({ designId: '00000000-0000-4000-8000-000000000000', axes: [{ parameter: 'lensArray.colour', values: [1] }] })
    expect(r.success).toBe(false)
  })

  it('names a lens axis on the planar device as a problem', () => {
    const planar = { ...base, lensArray: null }
    expect(axisProblems(planar, [{ parameter: 'lensArray.sagUm', values: [1] }])[0]).toMatch(/planar/)
  })
})

describe('sweep expansion', () => {
  it('is row-major with the first axis slowest', () => {
    const cells = expandSweep(base, [
      { parameter: 'lensArray.pitchUm', values: [10, 12] },
      { parameter: 'lensArray.sagUm', values: [1, 2, 3] },
    ])
    expect(cells.map((c) => c.coordinates)).toEqual([[10, 1], [10, 2], [10, 3], [12, 1], [12, 2], [12, 3]])
    expect(cells.map((c) => c.index)).toEqual([0, 1, 2, 3, 4, 5])
  })

  it('resolves fill factor to diameter at the pitch (Conway & Sloane ch. 1: hexagonal π/(2√3)·(D/p)²)', () => {
    const shallow = { ...base, lensArray: { ...base.lensArray!, sagUm: 2 } }
    const [cell] = expandSweep(shallow, [{ parameter: 'lensArray.fillFactor', values: [0.9069 * 0.25] }])
    expect(cell!.feasible).toBe(true)
    if (cell!.feasible) expect(cell!.scenario.lensArray!.diameterUm).toBeCloseTo(5, 3)
    // The same diameter at full sag (5 µm) is no spherical cap: the cell says why.
    const [deep] = expandSweep(base, [{ parameter: 'lensArray.fillFactor', values: [0.9069 * 0.25] }])
    expect(deep!.feasible).toBe(false)
  })

  it('resolves radius of curvature to sag at the diameter (standard geometry: D 10 µm, Rc 6.25 µm → h 2.5 µm)', () => {
    const [cell] = expandSweep(base, [{ parameter: 'lensArray.radiusOfCurvatureUm', values: [6.25] }])
    expect(cell!.feasible).toBe(true)
    if (cell!.feasible) expect(cell!.scenario.lensArray!.sagUm).toBeCloseTo(2.5, 10)
  })

  it('applies the fill factor before the radius, so the radius acts on the new diameter', () => {
    // f = 0.9069/4 → D = 5 µm; Rc = 3.125 µm → h = Rc − √(Rc² − 2.5²) = 1.25 µm.
    const [cell] = expandSweep(base, [
      { parameter: 'lensArray.radiusOfCurvatureUm', values: [3.125] },
      { parameter: 'lensArray.fillFactor', values: [(Math.PI / (2 * Math.sqrt(3))) / 4] },
    ])
    expect(cell!.feasible).toBe(true)
    if (cell!.feasible) expect(cell!.scenario.lensArray!.sagUm).toBeCloseTo(1.25, 9)
  })

  it('marks infeasible cells with their reason instead of failing', () => {
    const cells = expandSweep(base, [
      { parameter: 'lensArray.radiusOfCurvatureUm', values: [4, 6] },
      { parameter: 'lensArray.fillFactor', values: [0.5, 0.95] },
    ])
    expect(cells).toHaveLength(4)
    const reasons = cells.map((c) => (c.feasible ? 'ok' : c.reason))
    // D at f = 0.5 is 7.425 µm, so Rc = 4 µm fits (≥ 3.71 µm) and Rc = 6 µm fits; f = 0.95 exceeds 0.9069.
    expect(reasons[0]).toBe('ok')
    expect(reasons[1]).toMatch(/fill factor 0.95 is above the hexagonal maximum 0.9069/)
    expect(reasons[2]).toBe('ok')
    expect(reasons[3]).toMatch(/above the hexagonal maximum/)
    const tooSmall = expandSweep(base, [{ parameter: 'lensArray.radiusOfCurvatureUm', values: [4] }])[0]!
    expect(tooSmall.feasible).toBe(false)
    if (!tooSmall.feasible) expect(tooSmall.reason).toMatch(/below half the diameter \(5 µm\)/)
    const deep = expandSweep(base, [{ parameter: 'lensArray.sagUm', values: [6] }])[0]!
    expect(deep.feasible).toBe(false)
    if (!deep.feasible) expect(deep.reason).toMatch(/Sag h must be at most D\/2/)
  })
})

describe('cell seeds', () => {
  it('depend only on (sweep seed, cell index) and differ between cells', () => {
    expect(cellSeed(7, 3)).toBe(cellSeed(7, 3))
    const seeds = new Set(Array.from({ length: 1000 }, (_, i) => cellSeed(7, i)))
    expect(seeds.size).toBe(1000)
    expect(cellSeed(7, 0)).not.toBe(cellSeed(8, 0))
    for (const s of seeds) expect(s >>> 0).toBe(s)
  })
})
