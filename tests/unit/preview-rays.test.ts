// The 3-D preview (app/utils/previewRays.ts): the core's readable model plus drawing transforms, against closed forms
// and against the fused core on every emitter profile and cap shape.
import { describe, expect, it } from 'vitest'
import { patchSites, tracePreviewRays } from '../../app/utils/previewRays'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'
import { createTally, nearestSite, packScene, traceRange, T_EXTRACTED } from '../../shared/optics'

const base = { emitter: { index: 1.5 }, reflector: { reflectance: 1 }, substrate: { index: 1.5, thicknessUm: 100 }, trace: { fresnel: 'none' } }

describe('preview rays', () => {
  it('seed 7, 4000 rays: planar n = 1.5 with an ideal mirror and no Fresnel escapes 1 − cos θc = 0.2546 (escape cone over an ideal mirror; Greenham, Friend & Bradley, Adv. Mater. 6, 491 (1994), from memory) within 4σ', () => {
    const sc = scenarioSchema.parse({ ...base, lensArray: null })
    const n = 4000
    const rays = tracePreviewRays(sc, { rays: n, seed: 7, drawThicknessUm: 10 })
    const escaped = rays.filter((r) => r.fate !== 'lost').length / n
    const sigma = Math.sqrt(0.2546 * (1 - 0.2546) / n)
    expect(Math.abs(escaped - 0.2546)).toBeLessThan(4 * sigma)
  })

  it('seed 7: every escaped ray ends above the cap tops going up; paths stay near the patch', () => {
    const sc = scenarioSchema.parse({ ...base, trace: { fresnel: 'averaged' }, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } })
    const rays = tracePreviewRays(sc, { rays: 200, seed: 7, drawThicknessUm: 15 })
    expect(rays).toHaveLength(200)
    const out = rays.filter((r) => r.fate !== 'lost')
    expect(out.length).toBeGreaterThan(20)
    for (const r of out) {
      const last = r.paths.at(-1)!
      const end = last.at(-1)!, before = last.at(-2)!
      expect(end[2]!).toBeGreaterThan(15 + 5)
      expect(end[2]!).toBeGreaterThan(before[2]!)
    }
    // below the cap tops every drawn point lies in the patch (3.5 rows of √3/2·10 µm, plus one pitch for a cap at the edge)
    for (const r of rays) for (const p of r.paths) for (const q of p) if (q[2]! <= 20) expect(Math.max(Math.abs(q[0]!), Math.abs(q[1]!))).toBeLessThan(41)
  })

  it('seed 7: drawn vertices between the face and the cap tops lie on a drawn cap (spherical cap sag, standard geometry), also after a patch wrap', () => {
    const a = 5, h = 3, tDraw = 15
    const sc = scenarioSchema.parse({ ...base, trace: { fresnel: 'averaged' }, lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: h } })
    const rays = tracePreviewRays(sc, { rays: 300, seed: 7, drawThicknessUm: tDraw })
    const Rc = (a * a + h * h) / (2 * h)
    const half = 3.5 * 10 * Math.sqrt(3) / 2
    const site = new Float64Array(4)
    let checked = 0
    for (const r of rays) {
      for (const path of r.paths) {
        for (const [x, y, z] of path as Array<[number, number, number]>) {
          if (!(z > tDraw + 1e-9 && z < tDraw + h - 1e-9)) continue
          if (Math.abs(Math.abs(x) - half) < 1e-9 || Math.abs(Math.abs(y) - half) < 1e-9) continue // clipped at the patch edge
          nearestSite(true, 10, x, y, site)
          const rho = Math.hypot(x - site[0]!, y - site[1]!)
          // a vertex in air or lens below the tops is a cap hit: z = t + √(Rc² − ρ²) − (Rc − h)
          expect(Math.abs(z - (tDraw + Math.sqrt(Rc * Rc - rho * rho) - (Rc - h)))).toBeLessThan(1e-6)
          checked++
        }
      }
    }
    expect(checked).toBeGreaterThan(100)
  })

  it('patch sites: hexagonal rows are offset by half a pitch and √3/2 pitch apart; square is a grid', () => {
    const hex = patchSites('hexagonal', 10, 1)
    expect(hex).toContainEqual([0, 0])
    expect(hex.some(([x, y]) => Math.abs(x - 5) < 1e-9 && Math.abs(y - 8.660254) < 1e-6)).toBe(true)
    expect(patchSites('square', 10, 1)).toHaveLength(9)
  })

  // The preview draws the scenario a run traces: its escape fraction (stream 2) and the fused core's (stream 0)
  // are independent binomial estimates of the same η, so they agree within 5σ of their difference
  // (σ² = η(1−η)(1/N1 + 1/N2); 5σ two-sided false alarm 5.7e-7, normal tail).
  const stack = { emitter: { index: 1.7, angularProfile: 'isotropic' as const }, reflector: { reflectance: 0.8, diffuseFraction: 0 }, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 } }
  const hemi = { lattice: 'hexagonal' as const, pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' as const }
  const forward = { table: [[0, 1], [20, 0.95], [40, 0.6], [60, 0.2], [80, 0], [180, 0]] as Array<[number, number]> }
  const sphere = (a: number, h: number): Array<[number, number]> => {
    const Rc = (a * a + h * h) / (2 * h)
    return Array.from({ length: 41 }, (_, i) => [(a * i) / 40, Math.max(0, Math.sqrt(Rc * Rc - ((a * i) / 40) ** 2) - (Rc - h))] as [number, number])
  }
  const kinds: Record<string, ScenarioInput> = {
    'planar, isotropic': { ...stack, lensArray: null },
    'planar, Lambertian': { ...stack, emitter: { index: 1.7, angularProfile: 'lambertian' }, lensArray: null },
    'planar, forward table': { ...stack, emitter: { index: 1.7, angularProfile: forward }, lensArray: null },
    'spherical caps, isotropic': { ...stack, lensArray: hemi },
    'spherical caps, forward table': { ...stack, emitter: { index: 1.7, angularProfile: forward }, lensArray: hemi },
    'parabolic caps, Lambertian': { ...stack, emitter: { index: 1.7, angularProfile: 'lambertian' }, lensArray: { lattice: 'square', pitchUm: 20, diameterUm: 18, sagUm: 6, shape: 'parabolic' } },
    'conic caps k = −0.5': { ...stack, lensArray: { ...hemi, sagUm: 4, shape: 'conic', conicConstant: -0.5 } },
    'measured caps (sampled sphere of sag 2 µm)': { ...stack, lensArray: { ...hemi, sagUm: 2, shape: 'measured', profile: sphere(5, 2) } },
  }
  const coreEscape = (input: ScenarioInput, rays: number) => {
    const t = createTally()
    traceRange(packScene(scenarioSchema.parse(input)), 0, rays, 11, t)
    return t[T_EXTRACTED]! / rays
  }
  const N_PREVIEW = 3000, N_CORE = 30000
  for (const [name, input] of Object.entries(kinds)) {
    it(`escape fraction agrees with the core within 5σ: ${name} (preview seed 11, ${N_PREVIEW} rays; core seed 11, ${N_CORE} rays)`, () => {
      const rays = tracePreviewRays(scenarioSchema.parse(input), { rays: N_PREVIEW, seed: 11, drawThicknessUm: 15 })
      const p1 = rays.filter((r) => r.fate !== 'lost').length / N_PREVIEW
      const p2 = coreEscape(input, N_CORE)
      const sigma = Math.sqrt(p2 * (1 - p2) * (1 / N_PREVIEW + 1 / N_CORE))
      expect(Math.abs(p1 - p2)).toBeLessThan(5 * sigma)
    })
  }
  it('control: the same check tells a forward-peaked table from an isotropic emitter (caps and planar)', () => {
    for (const lensArray of [null, hemi]) {
      const rays = tracePreviewRays(scenarioSchema.parse({ ...stack, emitter: { index: 1.7, angularProfile: forward }, lensArray }), { rays: N_PREVIEW,
        seed: 11, drawThicknessUm: 15 })
      const p1 = rays.filter((r) => r.fate !== 'lost').length / N_PREVIEW
      const p2 = coreEscape({ ...stack, lensArray }, N_CORE)
      const sigma = Math.sqrt(p2 * (1 - p2) * (1 / N_PREVIEW + 1 / N_CORE))
      expect(Math.abs(p1 - p2)).toBeGreaterThan(5 * sigma)
    }
  })
})
