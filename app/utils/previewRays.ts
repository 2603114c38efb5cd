// Sample ray paths for the 3-D preview: the core's readable model (shared/optics/steps.ts, via traceRangeModel)
// traces the scenario exactly as a run does (same emitter profile, cap shape, Fresnel mode, source; stream 2 of
// the seed) and a recorder keeps each ray's vertices. Only the drawing is done here: the substrate is drawn
// thinner than it is (drawThicknessUm; lateral travel through it shrinks in proportion, and the point where a ray
// reaches the top face is moved by at most half a pitch so it meets the right spot of the cap it enters), and a
// ray leaving the drawn patch is shifted back by a whole lattice vector (the stack is laterally periodic),
// starting a new polyline. Frame z up, µm; the substrate's top face drawn at z = drawThicknessUm. Drawing maths
// (carrying an escaped ray on, cutting a segment at the patch edge) with gl-matrix's vec3.
import { vec3 } from 'gl-matrix'
import { createTally, HEX_ROW_FACTOR, nearestSite, packScene, T_EXTRACTED, traceRangeModel, type Ray, type RayRecorder } from '#shared/optics'
import type { Scenario } from '#shared/types/scenario'

/** A double-precision vec3 (gl-matrix's own create() is Float32, too coarse for µm positions on a drawn cap). */
const f64 = (x: number, y: number, z: number): vec3 => Float64Array.of(x, y, z) as unknown as vec3

/** escaped: left on its first pass; recycled: left after a reflection or a return from air; lost: did not leave. */
export type RayFate = 'escaped' | 'recycled' | 'lost'
export interface PreviewRay { fate: RayFate; /** polylines (a lattice wrap starts a new one), points as [x, y, z] µm */ paths: number[][][] }

/** Preview rays use their own stream of the seed (runs use 0 and 1), so they never repeat a run's rays. */
export const PREVIEW_STREAM = 2

/** Lattice sites of the drawn patch: those within (rings + ½) pitches of the origin in x and y. */
export function patchSites(lattice: 'hexagonal' | 'square', pitchUm: number, rings: number): Array<[number, number]> {
  const out: Array<[number, number]> = []
  const lim = (rings + 0.5) * pitchUm
  const rowUm = lattice === 'hexagonal' ? pitchUm * HEX_ROW_FACTOR : pitchUm
  const jMax = Math.floor(lim / rowUm)
  for (let j = -jMax; j <= jMax; j++) {
    for (let i = -2 * rings - 2; i <= 2 * rings + 2; i++) {
      const x = lattice === 'hexagonal' ? (i + 0.5 * j) * pitchUm : i * pitchUm
      if (Math.abs(x) <= lim) out.push([x, j * rowUm])
    }
  }
  return out
}

interface Traced { end: number; bounces: number; pts: number[][]; dir: [number, number, number] }

/** Traces `rays` rays of the scenario with the core's model and returns every ray's vertices (true geometry). */
export function tracePreviewPaths(sc: Scenario, rays: number, seed: number): Traced[] {
  const out: Traced[] = []
  let pts: number[][] = []
  const recorder: RayRecorder = {
    start() { pts = [] },
    vertex(x, y, z) { pts.push([x, y, z]) },
    finish(ray: Ray) { out.push({ end: ray.end, bounces: ray.bounces, pts, dir: [ray.dx, ray.dy, ray.dz] }) },
  }
  traceRangeModel(packScene(sc), 0, rays, seed, createTally(false, sc.panel !== undefined), PREVIEW_STREAM, recorder)
  return out
}

export function tracePreviewRays(sc: Scenario, opts: { rays?: number; seed?: number; rings?: number; drawThicknessUm: number }): PreviewRay[] {
  const lens = sc.lensArray
  const rings = opts.rings ?? 3
  const t = sc.substrate.thicknessUm, tDraw = opts.drawThicknessUm, k = tDraw / t
  const hex = !lens || lens.lattice === 'hexagonal'
  const pitch = lens?.pitchUm ?? 10
  const zTop = t + (lens?.sagUm ?? 0)
  const half = (rings + 0.5) * pitch * (hex ? HEX_ROW_FACTOR : 1) // keep rays within the patch
  const site = new Float64Array(4)
  const zDraw = (z: number) => (z <= t ? z * k : z - t + tDraw)
  const inside = (x: number, y: number) => Math.abs(x) <= half && Math.abs(y) <= half

  return tracePreviewPaths(sc, opts.rays ?? 200, opts.seed ?? 7).map((r) => {
    const fate: RayFate = r.end !== T_EXTRACTED ? 'lost' : r.bounces > 0 ? 'recycled' : 'escaped'
    const pts = r.pts.slice()
    if (fate !== 'lost') {
      // carry the escaping ray on until it is a pitch above the cap tops
      const last = pts.at(-1)!, dz = r.dir[2]
      const L = Math.max(3 * pitch, dz > 0 ? (zTop + pitch - last[2]!) / dz : 0)
      const end = vec3.scaleAndAdd(f64(0, 0, 0), f64(last[0]!, last[1]!, last[2]!), f64(...r.dir), L)
      pts.push([end[0], end[1], end[2]])
    }
    // drawn = true − (sx, sy); the shift grows while the substrate is drawn thin and is put back on a lattice
    // vector where the ray reaches the top face
    let sx = 0, sy = 0
    let prev = pts[0]!
    let px = prev[0]!, py = prev[1]!
    if (lens && !inside(px, py)) { nearestSite(hex, pitch, px, py, site); sx = site[0]!; sy = site[1]!; px -= sx; py -= sy }
    const paths: number[][][] = [[[px, py, zDraw(prev[2]!)]]]
    for (let i = 1; i < pts.length; i++) {
      const q = pts[i]!
      const inSubstrate = prev[2]! <= t && q[2]! <= t
      if (inSubstrate) {
        sx += (1 - k) * (q[0]! - prev[0]!); sy += (1 - k) * (q[1]! - prev[1]!)
        if (lens && q[2]! === t) { nearestSite(hex, pitch, sx, sy, site); sx = site[0]!; sy = site[1]! }
      }
      let qx = q[0]! - sx, qy = q[1]! - sy
      const qz = zDraw(q[2]!)
      const last = i === pts.length - 1 && fate !== 'lost'
      if (lens && !last && !inside(qx, qy)) {
        // draw up to the patch edge, then carry on from the end point moved back into the patch
        const ax = paths.at(-1)!.at(-1)!
        const ex = qx - ax[0]!, ey = qy - ax[1]!
        let te = 1
        if (qx > half) te = Math.min(te, (half - ax[0]!) / ex)
        if (qx < -half) te = Math.min(te, (-half - ax[0]!) / ex)
        if (qy > half) te = Math.min(te, (half - ax[1]!) / ey)
        if (qy < -half) te = Math.min(te, (-half - ax[1]!) / ey)
        te = Math.max(0, te)
        const edge = vec3.lerp(f64(0, 0, 0), f64(ax[0]!, ax[1]!, ax[2]!), f64(qx, qy, qz), te)
        paths.at(-1)!.push([edge[0], edge[1], edge[2]])
        nearestSite(hex, pitch, qx, qy, site)
        sx += site[0]!; sy += site[1]!; qx -= site[0]!; qy -= site[1]!
        paths.push([[qx, qy, qz]])
      } else paths.at(-1)!.push([qx, qy, qz])
      prev = q
    }
    return { fate, paths }
  })
}
