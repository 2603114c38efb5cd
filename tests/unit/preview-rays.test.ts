// The 3-D preview (app/utils/previewRays.ts): the core's readable model plus drawing transforms, against closed forms
// and against the fused core on every emitter profile and cap shape.
import { describe, expect, it } from 'vitest'
import { patchSites, tracePreviewRays } from '../../app/utils/previewRays'
import { scenarioSchema } from '../../shared/types/scenario'

const base = { emitter: { index: 1.5 }, reflector: { reflectance: 1 }, substrate: { index: 1.5, thicknessUm: 100 }, trace: { fresnel: 'none' } }

describe('preview rays', () => {
  it('seed 7, 4000 rays: planar n = 1.5 with an ideal mirror and no Fresnel escapes 1 − cos θc = 0.2546 (escape cone of an isotropic emitter over an ideal mirror, Hecht, Optics, §4.7) within 4σ', () => {
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

  it('patch sites: hexagonal rows are offset by half a pitch and √3/2 pitch apart; square is a grid', () => {
    const hex = patchSites('hexagonal', 10, 1)
    expect(hex).toContainEqual([0, 0])
    expect(hex.some(([x, y]) => Math.abs(x - 5) < 1e-9 && Math.abs(y - 8.660254) < 1e-6)).toBe(true)
    expect(patchSites('square', 10, 1)).toHaveLength(9)
  })
})
