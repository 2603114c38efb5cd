// The finite panel (shared/optics/panel.ts): rays move sideways through the glass, meet the substrate's edges and
// are measured by a detector. Checks against geometric closed forms, the infinite array as the large-panel limit,
// the method of images (mirrored edges), and energy closure. Tolerances are K·σ from the ray counts.
import { describe, expect, it } from 'vitest'
import {
  createRay, createTally, flatCompanion, launch, MEDIUM_SUBSTRATE, packScene, panelBlockOf, PT_EDGE, resetRay, stackOf, T_EXTRACTED, T_RAYS,
  T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED, T_UNRESOLVED, T_WAVEGUIDED, traceRange, traceRay, traceScenario, type RayRecorder,
} from '../../shared/optics'
import { scenarioSchema, type ScenarioInput } from '../../shared/types/scenario'

/** 4σ two-sided for each scalar figure (normal tail 6.3e-5; Abramowitz & Stegun, §26.2, from memory). */
const K = 4
const DEG = Math.PI / 180

const hemi = { lattice: 'hexagonal' as const, pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical' as const }
const sheet = {
  emitter: { index: 1.7, angularProfile: 'isotropic' as const },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
}

function tallyOf(input: ScenarioInput, rays: number, seed: number): Float64Array {
  const scene = packScene(scenarioSchema.parse(input))
  const t = createTally(false, true)
  traceRange(scene, 0, rays, seed, t)
  return t
}

const binomial = (p: number, n: number) => Math.sqrt((p * (1 - p)) / n)

describe('lateral travel in the glass', () => {
  it('a totally reflected ray comes back to the bottom face 2t·tanθ away along its azimuth (0.7 mm glass at 50°: 1.668 mm; plane geometry)', () => {
    // one ray by hand: in the glass at z = 0 going up at 50° (beyond θc = 41.8° of 1.5 → air), R = 0 below
    const sc = scenarioSchema.parse({
      emitter: { index: 1.5 }, reflector: { reflectance: 0 }, substrate: { index: 1.5, thicknessUm: 700 }, lensArray: null,
      trace: { fresnel: 'none' }, panel: { widthMm: 100, heightMm: 100, edges: 'absorbing' },
    })
    const st = stackOf(packScene(sc))
    const pts: Array<[number, number, number]> = []
    const rec: RayRecorder = { start: () => {}, vertex: (x, y, z) => { pts.push([x, y, z]) }, finish: () => {} }
    const ray = createRay()
    resetRay(ray, 1, 0, 0)
    const th = 50 * DEG, ph = 30 * DEG
    ray.medium = MEDIUM_SUBSTRATE; ray.nE = 1.5; ray.nS = 1.5; ray.nL = 1.5
    ray.dx = Math.sin(th) * Math.cos(ph); ray.dy = Math.sin(th) * Math.sin(ph); ray.dz = Math.cos(th)
    traceRay(ray, st, rec)
    expect(ray.end).toBe(T_REFLECTOR)
    const back = pts.find((p, i) => i > 0 && p[2] === 0)!
    const shift = Math.hypot(back[0], back[1])
    expect(Math.abs(shift - 2 * 700 * Math.tan(th))).toBeLessThan(1e-9)
    expect(Math.abs(shift - 1668.5)).toBeLessThan(0.1) // 2 · 700 µm · tan 50° = 1668.46 µm
    expect(Math.abs(Math.atan2(back[1], back[0]) - ph)).toBeLessThan(1e-12)
  })

  it('launched rays start uniformly over the emitting area (mean 0, variance w²/12 in x; seed 3)', () => {
    const sc = scenarioSchema.parse({ ...sheet, lensArray: null, panel: { widthMm: 10, heightMm: 4, emitting: { widthMm: 6, heightMm: 2 } } })
    const st = stackOf(packScene(sc))
    const ray = createRay()
    const N = 20000
    let sx = 0, sxx = 0, maxY = 0
    for (let i = 0; i < N; i++) {
      resetRay(ray, 3, 0, i)
      launch(ray, st)
      sx += ray.x; sxx += ray.x * ray.x; maxY = Math.max(maxY, Math.abs(ray.y))
    }
    const w = 6000, varX = (w * w) / 12
    expect(Math.abs(sx / N)).toBeLessThan(K * Math.sqrt(varX / N))
    // variance of a uniform's square: w⁴/80 − (w²/12)²
    expect(Math.abs(sxx / N - varX)).toBeLessThan(K * Math.sqrt((w ** 4 / 80 - varX * varX) / N))
    expect(maxY).toBeLessThanOrEqual(1000)
  })
})

/**
 * Share of rays that reach an absorbing edge when each ray makes exactly one lateral excursion: emission index = glass
 * index (no interface), Fresnel off, reflector R = 0. An isotropic ray going up at θ travels L = t·tanθ to the top
 * face and escapes if sinθ < 1/n, else it is totally reflected and travels 2t·tanθ in all before the reflector takes
 * it; going down it meets the reflector at once. A uniform point p of a w × h rectangle stays inside along
 * p + s·d, s ≤ L, iff p lies in the rectangle shifted by −L·d, so P(reach) = 1 − (w − L|dx|)₊(h − L|dy|)₊/(w·h)
 * (plane geometry). Integrated on a midpoint grid in μ = cosθ (upward half of the sphere, weight ½) and φ.
 */
function firstExcursionEdgeShare(n: number, tUm: number, wUm: number, hUm: number): number {
  const M = 2000, P = 720
  let sum = 0
  for (let i = 0; i < M; i++) {
    const mu = (i + 0.5) / M, s = Math.sqrt(1 - mu * mu)
    const L = (s < 1 / n ? 1 : 2) * tUm * (s / mu)
    for (let j = 0; j < P; j++) {
      const ph = (2 * Math.PI * (j + 0.5)) / P
      const kept = Math.max(0, wUm - L * Math.abs(Math.cos(ph))) * Math.max(0, hUm - L * Math.abs(Math.sin(ph)))
      sum += 1 - kept / (wUm * hUm)
    }
  }
  return (0.5 * sum) / (M * P)
}

describe('edge losses against the geometric closed form (lossless glass, one excursion per ray)', () => {
  const cases: Array<[number, number, number, number]> = [
    // [glass thickness µm, panel w mm, h mm, seed]
    [700, 0.5, 0.5, 11], // tiny glass: most trapped light goes out at the edge
    [700, 3, 2, 12],
    [700, 40, 40, 13], // a large panel: edge share ≈ perimeter · mean excursion / area
    [100, 40, 40, 14], // and thin glass: it vanishes
  ]
  for (const [tUm, w, h, seed] of cases) {
    it(`t = ${tUm} µm, ${w} × ${h} mm: edge share = the closed form within ${K}σ (seed ${seed})`, () => {
      const N = 200_000
      const t = tallyOf({
        emitter: { index: 1.5 }, reflector: { reflectance: 0 }, substrate: { index: 1.5, thicknessUm: tUm }, lensArray: null,
        trace: { fresnel: 'none' }, panel: { widthMm: w, heightMm: h, edges: 'absorbing' },
      }, N, seed)
      const want = firstExcursionEdgeShare(1.5, tUm, w * 1000, h * 1000)
      const got = t[panelBlockOf(t) + PT_EDGE]! / N
      expect(Math.abs(got - want)).toBeLessThan(K * binomial(want, N) + 1e-4) // + the quadrature's own error (< 1e-4)
      // every ray in one channel
      const channels = [T_EXTRACTED, T_REFLECTOR, T_SUBSTRATE, T_WAVEGUIDED, T_TRAPPED, T_UNRESOLVED].reduce((a, i) => a + t[i]!, 0)
      expect(channels + t[panelBlockOf(t) + PT_EDGE]!).toBe(N)
      if (w === 0.5) expect(got).toBeGreaterThan(0.35)
      // thinner glass, shorter excursions: the edge share falls roughly as t (the grazing tail keeps it above t/7)
      if (tUm === 100) expect(got).toBeLessThan(firstExcursionEdgeShare(1.5, 700, w * 1000, h * 1000) / 3)
    })
  }
})

describe('mirrored edges: the method of images makes a uniformly emitting flat panel the infinite one', () => {
  it('flat stack, diffuse reflector, 1 × 1.5 mm panel of 0.7 mm glass: extraction = the exact infinite flat value within 4σ (seed 21)', () => {
    // mirrored images of a laterally uniform stack tile the plane: the same escape statistics as the infinite stack
    const input: ScenarioInput = {
      ...sheet, reflector: { reflectance: 0.9, diffuseFraction: 0.5 }, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 0.05 }, lensArray: null,
    }
    const N = 200_000
    const want = flatCompanion(scenarioSchema.parse({ ...input, lensArray: hemi }))!.extraction
    const t = tallyOf({ ...input, panel: { widthMm: 1, heightMm: 1.5, edges: 'mirrored' } }, N, 21)
    expect(Math.abs(t[T_EXTRACTED]! / N - want)).toBeLessThan(K * binomial(want, N))
    expect(t[panelBlockOf(t) + PT_EDGE]).toBe(0)
  })
})

describe('energy closure with polished edges', () => {
  it('R = 1, lossless glass and film, polished edges: everything leaves by the front or the edges (seed 31)', () => {
    const N = 50_000
    const t = tallyOf({
      ...sheet, reflector: { reflectance: 1, diffuseFraction: 0 }, substrate: { index: 1.5, thicknessUm: 300, absorptionPerMm: 0 }, lensArray: hemi,
      trace: { maxEvents: 100_000 }, panel: { widthMm: 2, heightMm: 2, edges: 'polished', detector: { kind: 'sphere', includeEdges: true } },
    }, N, 31)
    const edge = t[panelBlockOf(t) + PT_EDGE]!
    expect(t[T_EXTRACTED]! + edge + t[T_WAVEGUIDED]! + t[T_UNRESOLVED]!).toBe(N)
    expect(t[T_UNRESOLVED]!).toBe(0)
    expect(edge).toBeGreaterThan(0.05 * N)
  })
})

describe('the large panel tends to the infinite array', () => {
  // the hex hemisphere film on 100 µm glass, absorbing edges; the sphere reads the front light
  const film = { ...sheet, substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0.2 }, lensArray: hemi }
  const N = 150_000
  it(`sphere: |η(panel) − η∞| shrinks as the panel grows (1, 4, 30 mm) and the 30 mm panel is within ${K}σ of η∞ (seeds 41–44)`, () => {
    const inf = traceScenario(scenarioSchema.parse(film), { rays: N, seed: 41 })
    const gaps: number[] = []
    let last = { extraction: 0, err: 0 }
    for (const [w, seed] of [[1, 42], [4, 43], [30, 44]] as const) {
      const r = traceScenario(scenarioSchema.parse({ ...film, panel: { widthMm: w, heightMm: w, edges: 'absorbing' } }), { rays: N, seed })
      expect(r.panel?.measured.unit).toBe('%')
      expect(r.panel!.measured.value).toBe(r.extraction)
      gaps.push(inf.extraction - r.extraction)
      last = { extraction: r.extraction, err: r.extractionStdErr }
      expect(r.losses.edge!).toBeGreaterThan(0)
    }
    const sigma = Math.hypot(inf.extractionStdErr, last.err)
    // the small panels lose light at the edges (the gap is positive and far above the noise), the gap falls with size
    expect(gaps[0]!).toBeGreaterThan(K * sigma)
    expect(gaps[0]!).toBeGreaterThan(gaps[1]! + K * sigma)
    expect(Math.abs(gaps[2]!)).toBeLessThan(K * sigma)
    expect(Math.abs(last.extraction - inf.extraction)).toBeLessThan(K * sigma)
  })

  it(`a luminance-meter spot well inside a large panel reads the infinite luminance in its cone within ${K}σ (seeds 51, 52)`, () => {
    const inf = traceScenario(scenarioSchema.parse(film), { rays: N, seed: 51 })
    // the infinite array's luminance in the meter's 15° cone, from its 1° bins (15 whole bins)
    const t = createTally()
    traceRange(packScene(scenarioSchema.parse(film)), 0, N, 51, t)
    let c = 0
    for (let b = 0; b < 15; b++) c += t[T_THETA + b]!
    const lamb = Math.sin(15 * DEG) ** 2
    const want = c / N / lamb, wantErr = binomial(c / N, N) / lamb
    const r = traceScenario(scenarioSchema.parse({
      ...film, panel: { widthMm: 30, heightMm: 30, edges: 'absorbing', detector: { kind: 'luminanceMeter', spotCentreMm: [0, 0], spotDiameterMm: 16, acceptanceDeg: 15 } },
    }), { rays: N * 4, seed: 52 })
    expect(r.panel!.measured.unit).toBe('× Lamb.')
    expect(inf.rays).toBe(N)
    expect(Math.abs(r.panel!.measured.value - want)).toBeLessThan(K * Math.hypot(wantErr, r.panel!.measured.stdErr))
    // the flat companion is measured the same way: traced over the same panel, read by the same meter
    expect(r.planar.method).toBe('traced')
    expect(r.panel!.planarMeasured.value).toBeGreaterThan(0)
    expect(r.panel!.gain.stdErr).toBeGreaterThan(0)
    expect(t[T_RAYS]).toBe(N)
  })
})
