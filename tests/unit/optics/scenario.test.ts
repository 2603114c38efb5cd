// The scenario schema: defaults and field-named error messages (the wording is the reference).
import { describe, expect, it } from 'vitest'
import { parseScenario, scenarioSchema } from '../../../shared/types/scenario'

const example = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 1000000, seed: 1, fresnel: 'averaged' },
}

function errors(data: unknown): string[] {
  const r = parseScenario(data)
  if (r.ok) throw new Error('expected errors')
  return r.errors
}

describe('scenario schema', () => {
  it('accepts the issue example', () => {
    expect(scenarioSchema.parse(example).lensArray?.sagUm).toBe(5)
  })
  it('fills defaults: lens index = substrate index, fresnel averaged, diffuseFraction 0, absorption 0, maxEvents', () => {
    const s = scenarioSchema.parse({
      emitter: { index: 1.8 }, reflector: { reflectance: 1 }, substrate: { index: 1.52, thicknessUm: 700 },
      lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 3 },
    })
    expect(s.lensArray?.index).toBe(1.52)
    expect(s.lensArray?.shape).toBe('spherical')
    expect(s.trace.fresnel).toBe('averaged')
    expect(s.reflector.diffuseFraction).toBe(0)
    expect(s.substrate.absorptionPerMm).toBe(0)
    expect(s.trace.maxEvents).toBeGreaterThan(100)
    expect(s.emitter.angularProfile).toBe('isotropic')
    expect(s.emitter.source).toEqual({ shape: 'extended' })
  })
  it('lensArray null is the planar device', () => {
    expect(scenarioSchema.parse({ ...example, lensArray: null }).lensArray).toBeNull()
  })
  it('names the field in the editor\'s words with the rounded limit and unit', () => {
    expect(errors({ ...example, lensArray: { ...example.lensArray, sagUm: 6 } })).toEqual([
      'Sag h must be at most D/2 = 5 µm for a spherical cap: got 6 µm',
    ])
  })
  it('rounds limits to 0.01 µm and names no internal field path', () => {
    // D = 8.785558909884498 µm: D/2 = 4.392779454942249 µm, shown as 4.39 µm (common practice: 0.01 µm line precision)
    const e = errors({ ...example, lensArray: { ...example.lensArray, diameterUm: 8.785558909884498, sagUm: 6 } })
    expect(e).toEqual(['Sag h must be at most D/2 = 4.39 µm for a spherical cap: got 6 µm'])
    const many = errors({ ...example, emitter: { index: 0.9, source: { shape: 'disc', radiusUm: -1 } }, substrate: { index: 1.5, thicknessUm: 0 } })
    for (const m of many) expect(m).not.toMatch(/\b(emitter|substrate|lensArray|reflector|trace)\./)
    expect(many).toContain('Source radius must be above 0 µm: got -1 µm')
    expect(many).toContain('Substrate thickness must be above 0 µm: got 0 µm')
  })
  it('reports every bad field by its name', () => {
    const e = errors({ ...example, emitter: { index: 0.9, source: { shape: 'disc' } }, reflector: { reflectance: 1.2 }, trace: { fresnel: 'magic', rays: 0 } })
    expect(e).toContain('Emitter index must be at least 1: got 0.9')
    expect(e).toContain('Source radius is required')
    expect(e).toContain('Back reflectance must be at most 1: got 1.2')
    expect(e).toContain('Rays must be at least 1: got 0')
    expect(e.some((m) => m.startsWith('Fresnel mode must be one of "averaged", "none"'))).toBe(true)
  })
  it('diameter above pitch, a conic without its constant, a bad profile table', () => {
    expect(errors({ ...example, lensArray: { ...example.lensArray, diameterUm: 11, sagUm: 2 } })).toEqual([
      'Base diameter D must be at most the pitch p = 10 µm (caps may touch, not overlap): got 11 µm',
    ])
    expect(errors({ ...example, lensArray: { ...example.lensArray, shape: 'conic' } })).toEqual(['Conic constant k is required for a conic cap'])
    expect(errors({ ...example, emitter: { ...example.emitter, angularProfile: { table: [[0, 1], [0, 2]] } } })[0]).toMatch(/^Emission profile table row 2, θ \(°\): θ must increase/)
  })
  it('accepts source shapes and profiles of every kind', () => {
    for (const source of [{ shape: 'disc', radiusUm: 1 }, { shape: 'rectangle', widthUm: 3, heightUm: 4 }]) {
      expect(parseScenario({ ...example, emitter: { ...example.emitter, source } }).ok).toBe(true)
    }
    for (const angularProfile of ['lambertian', { table: [[0, 1], [90, 0]] }]) {
      expect(parseScenario({ ...example, emitter: { ...example.emitter, angularProfile } }).ok).toBe(true)
    }
    expect(parseScenario({ ...example, lensArray: { ...example.lensArray, shape: 'conic', conicConstant: -2, sagUm: 4 } }).ok).toBe(true)
  })
})
