// Sample ray paths for the 3-D preview. The production tracer (shared/optics/tracer.ts) keeps no per-ray path (its
// hot loop allocates nothing), so this is a small path-recording twin built from the core's own pieces: the packed
// scene (packScene), the cap intersection and normal (capHit, capNormal), the Fresnel/Snell reference functions
// (interfaces.ts), the launch samplers and the seeded RNG. It follows the same life (emitter → substrate → cap or
// land → air, reflector recycling) but searches neighbouring caps by brute force over the drawn patch and may draw
// the substrate thinner than it is (absorption rescaled so α·t is kept): fine for a picture of ~200 rays, not a
// tally. Frame z up, µm; the substrate's top face at z = t.
import {
  capHit, capNormal, cosTransmitted, createRngState, fresnelAveragedWithCosT, nextUniform, packScene, sampleCell,
  sampleDisc, sampleIsotropic, sampleLambertian, sampleRectangle, seedRay, HEX_ROW_FACTOR,
} from '#shared/optics'
import type { Scenario } from '#shared/types/scenario'
import { conicCurvaturePerUm, shapeConicConstant } from '#shared/types/geometry'

export type RayFate = 'escaped' | 'recycled' | 'lost'
export interface PreviewRay { fate: RayFate; /** polylines (a lattice wrap starts a new one), points as [x, y, z] µm */ paths: number[][][] }

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

export function tracePreviewRays(sc: Scenario, opts: { rays?: number; seed?: number; rings?: number; drawThicknessUm: number }): PreviewRay[] {
  const lens = sc.lensArray
  const n = opts.rays ?? 200
  const rings = opts.rings ?? 3
  const scene = packScene(sc)
  const nE = sc.emitter.index, nS = sc.substrate.index, nL = lens?.index ?? nS
  const t = opts.drawThicknessUm
  const alpha = (sc.substrate.absorptionPerMm / 1000) * (sc.substrate.thicknessUm / t)
  const rb = sc.reflector.reflectance, fd = sc.reflector.diffuseFraction
  const hex = !lens || lens.lattice === 'hexagonal'
  const pitch = lens?.pitchUm ?? 10
  const a = lens ? lens.diameterUm / 2 : 0, h = lens?.sagUm ?? 0
  // A measured profile is drawn as the spherical cap of the same diameter and sag (the preview only; runs trace it).
  const k = lens ? shapeConicConstant(lens.shape === 'measured' ? 'spherical' : lens.shape, lens.conicConstant) : 0
  const cv = lens ? conicCurvaturePerUm(lens.diameterUm, h, k) : 0
  const k1 = 1 + k, zv = t + h
  const sites = lens ? patchSites(lens.lattice, pitch, rings) : []
  const half = (rings + 0.5) * pitch * (hex ? HEX_ROW_FACTOR : 1) // keep rays within the patch
  const rng = createRngState()
  const v = new Float64Array(3), nrm = new Float64Array(3)
  const fresnel = sc.trace.fresnel !== 'none'
  const out: PreviewRay[] = []
  void scene

  for (let r = 0; r < n; r++) {
    seedRay(rng, opts.seed ?? 7, 2, r)
    const u1 = nextUniform(rng), u2 = nextUniform(rng)
    const src = sc.emitter.source
    if (src.shape === 'disc') sampleDisc(src.radiusUm, u1, u2, v)
    else if (src.shape === 'rectangle') sampleRectangle(src.widthUm, src.heightUm, u1, u2, v)
    else { sampleCell(hex, pitch, u1, u2, v); v[0] = v[0]! - pitch / 2; v[1] = v[1]! - pitch / 2 }
    let x = v[0]!, y = v[1]!, z = 0
    if (sc.emitter.angularProfile === 'lambertian') sampleLambertian(nextUniform(rng), nextUniform(rng), v)
    else sampleIsotropic(nextUniform(rng), nextUniform(rng), v)
    let dx = v[0]!, dy = v[1]!, dz = v[2]!
    let med = 0 // 0 emitter, 1 substrate, 2 lens (site sx, sy), 3 air
    let sx = 0, sy = 0
    let recycled = false
    let fate: RayFate | null = null
    let lastCap = -1
    const paths: number[][][] = [[[x, y, z]]]
    const pt = () => paths[paths.length - 1]!.push([x, y, z])
    // the patch is finite but the array is not: a point outside the drawn patch is shifted back by whole lattice
    // vectors (the stack is laterally periodic) and the drawing starts a new polyline there
    const wrap = () => {
      if (!lens || (Math.abs(x) <= half && Math.abs(y) <= half)) return false
      const j = Math.round(y / (pitch * (hex ? HEX_ROW_FACTOR : 1)))
      const i = Math.round((x - (hex ? 0.5 * j * pitch : 0)) / pitch)
      x -= (i + (hex ? 0.5 * j : 0)) * pitch
      y -= j * pitch * (hex ? HEX_ROW_FACTOR : 1)
      paths.push([[x, y, z]])
      return true
    }
    const edgeTau = () => Math.min(dx > 0 ? (half - x) / dx : dx < 0 ? (-half - x) / dx : Infinity, dy > 0 ? (half - y) / dy : dy < 0 ? (-half - y) / dy : Infinity)
    const refl = (cosI: number, n1: number, n2: number) => {
      const cosT = cosTransmitted(cosI, n1, n2)
      if (cosT < 0) return { tir: true, cosT: 0 }
      return { tir: fresnel && nextUniform(rng) < fresnelAveragedWithCosT(cosI, cosT, n1, n2), cosT }
    }
    for (let ev = 0; ev < 80 && fate === null; ev++) {
      if (med === 0) {
        if (dz < 0) {
          if (nextUniform(rng) >= rb) { fate = 'lost'; break }
          recycled = true
          if (fd > 0 && nextUniform(rng) < fd) { sampleLambertian(nextUniform(rng), nextUniform(rng), v); dx = v[0]!; dy = v[1]!; dz = v[2]! } else dz = -dz
          continue
        }
        const f = refl(dz, nE, nS)
        if (f.tir && cosTransmitted(dz, nE, nS) < 0) { fate = 'lost'; break } // guided in the organic layers
        if (f.tir) { dz = -dz; continue }
        const eta = nE / nS
        dx *= eta; dy *= eta; dz = f.cosT
        med = 1
        continue
      }
      if (med === 1) {
        wrap()
        const path = dz > 0 ? (t - z) / dz : -z / dz
        if (alpha > 0 && -Math.log(nextUniform(rng)) < alpha * path) { x += dx * path * 0.5; y += dy * path * 0.5; z += dz * path * 0.5; pt(); fate = 'lost'; break }
        const te = lens ? edgeTau() : Infinity
        if (te >= 0 && te < path) {
          // draw up to the patch edge, then carry on from the wrapped end point
          paths[paths.length - 1]!.push([x + dx * te, y + dy * te, z + dz * te])
          x += dx * path; y += dy * path; z = dz > 0 ? t : 0
          if (!wrap()) pt()
        } else {
          x += dx * path; y += dy * path; z = dz > 0 ? t : 0
          pt()
          wrap()
        }
        if (dz < 0) {
          const f = refl(-dz, nS, nE)
          if (f.tir) { dz = -dz; recycled = true; continue }
          const eta = nS / nE
          dx *= eta; dy *= eta; dz = -f.cosT
          med = 0
          continue
        }
        let site = -1, best = Infinity
        for (let s = 0; s < sites.length; s++) {
          const ex = x - sites[s]![0], ey = y - sites[s]![1]
          const d2 = ex * ex + ey * ey
          if (d2 < a * a && d2 < best) { best = d2; site = s }
        }
        if (site >= 0) {
          sx = sites[site]![0]; sy = sites[site]![1]
          if (nL !== nS) {
            const f = refl(dz, nS, nL)
            if (f.tir) { dz = -dz; continue }
            const eta = nS / nL
            dx *= eta; dy *= eta; dz = f.cosT
          }
          med = 2
          lastCap = -1
          continue
        }
        const f = refl(dz, nS, 1)
        if (f.tir) { dz = -dz; recycled = true; continue }
        dx *= nS; dy *= nS; dz = f.cosT
        med = 3
        lastCap = -1
        continue
      }
      if (med === 2) {
        const tS = capHit(x - sx, y - sy, z, dx, dy, dz, zv, cv, k1, h, lastCap === -2)
        const tB = dz < 0 ? (t - z) / dz : Infinity
        if (tS > 0 && tS < tB) {
          x += dx * tS; y += dy * tS; z += dz * tS
          pt()
          capNormal(x - sx, y - sy, z, zv, cv, k1, nrm)
          const cosI = dx * nrm[0]! + dy * nrm[1]! + dz * nrm[2]!
          const f = refl(cosI, nL, 1)
          if (f.tir) {
            dx -= 2 * cosI * nrm[0]!; dy -= 2 * cosI * nrm[1]!; dz -= 2 * cosI * nrm[2]!
            lastCap = -2 // on the surface
            recycled = true
            continue
          }
          const g = f.cosT - nL * cosI
          dx = nL * dx + g * nrm[0]!; dy = nL * dy + g * nrm[1]!; dz = nL * dz + g * nrm[2]!
          med = 3
          lastCap = sites.findIndex((s) => s[0] === sx && s[1] === sy)
          continue
        }
        if (tB === Infinity) { fate = 'lost'; break }
        x += dx * tB; y += dy * tB; z = t
        pt()
        if (nL !== nS) {
          const f = refl(-dz, nL, nS)
          if (f.tir) { dz = -dz; continue }
          const eta = nL / nS
          dx *= eta; dy *= eta; dz = -f.cosT
        }
        med = 1
        continue
      }
      // air below the cap tops: the nearest cap of the patch, else the land, else away
      let bestT = Infinity, bestS = -1
      for (let s = 0; s < sites.length; s++) {
        if (s === lastCap) continue
        const tau = capHit(x - sites[s]![0], y - sites[s]![1], z, dx, dy, dz, zv, cv, k1, h, false)
        if (tau > 0 && tau < bestT) { bestT = tau; bestS = s }
      }
      const tLand = dz < 0 ? (t - z) / dz : Infinity
      {
        if (wrap()) { lastCap = -1; continue }
        const tTop = dz > 0 && z < zv ? (zv - z) / dz : 0
        const tNext = Math.min(bestT, tLand, bestS < 0 && tLand === Infinity ? tTop : Infinity)
        const tEdge = edgeTau()
        if (lens && tEdge < tNext && tEdge >= 0) {
          x += dx * tEdge; y += dy * tEdge; z += dz * tEdge
          pt()
          x += dx * 1e-6; y += dy * 1e-6; z += dz * 1e-6 // just past the edge, so the wrap applies
          wrap()
          lastCap = -1
          continue
        }
      }
      if (bestS < 0 && tLand === Infinity) {
        const L = 3 * pitch
        x += dx * L; y += dy * L; z += dz * L
        pt()
        fate = recycled ? 'recycled' : 'escaped'
        break
      }
      if (bestT < tLand) {
        x += dx * bestT; y += dy * bestT; z += dz * bestT
        pt()
        sx = sites[bestS]![0]; sy = sites[bestS]![1]
        capNormal(x - sx, y - sy, z, zv, cv, k1, nrm)
        const cosI = -(dx * nrm[0]! + dy * nrm[1]! + dz * nrm[2]!)
        const f = refl(cosI, 1, nL)
        if (f.tir) {
          dx += 2 * cosI * nrm[0]!; dy += 2 * cosI * nrm[1]!; dz += 2 * cosI * nrm[2]!
          lastCap = bestS
          continue
        }
        const eta = 1 / nL
        const g = eta * cosI - f.cosT
        dx = eta * dx + g * nrm[0]!; dy = eta * dy + g * nrm[1]!; dz = eta * dz + g * nrm[2]!
        med = 2
        lastCap = -2
        recycled = true
        continue
      }
      x += dx * tLand; y += dy * tLand; z = t
      pt()
      const f = refl(-dz, 1, nS)
      if (f.tir) { dz = -dz; lastCap = -1; continue }
      dx /= nS; dy /= nS; dz = -f.cosT
      med = 1
      recycled = true
    }
    out.push({ fate: fate ?? 'lost', paths })
  }
  return out
}
