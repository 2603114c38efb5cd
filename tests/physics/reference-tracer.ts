// A deliberately plain second implementation of the stack model, for cross-checking the fast tracer
// (common practice: two independent implementations of one model must agree within their σ). Absolute
// coordinates (no wrapping), brute-force search over lattice sites, spheres intersected as spheres, plain
// objects. Scope: spherical caps on a hexagonal or square lattice, lens index = substrate index, extended
// source, isotropic emission, averaged Fresnel, specular or diffuse reflector, no absorption.
import { createRngState, nextUniform, seedRay } from '../../shared/optics/rng'

interface RefStack { nE: number; nS: number; rb: number; fd: number; tUm: number; lattice: 'hexagonal' | 'square'; pitchUm: number; diameterUm: number; sagUm: number }
type V = [number, number, number]

const dot = (a: V, b: V) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2]

function fresnel(cosI: number, n1: number, n2: number): { R: number; cosT: number } {
  const sin2T = (n1 / n2) ** 2 * (1 - cosI * cosI)
  if (sin2T >= 1) return { R: 1, cosT: 0 }
  const cosT = Math.sqrt(1 - sin2T)
  const rs = (n1 * cosI - n2 * cosT) / (n1 * cosI + n2 * cosT)
  const rp = (n2 * cosI - n1 * cosT) / (n2 * cosI + n1 * cosT)
  return { R: (rs * rs + rp * rp) / 2, cosT }
}

/** Refracts or reflects d at a surface with unit normal n facing the incoming ray; returns [new d, transmitted]. */
function cross(d: V, n: V, n1: number, n2: number, u: number): [V, boolean] {
  const cosI = -dot(d, n)
  const { R, cosT } = fresnel(cosI, n1, n2)
  if (u < R) return [[d[0] + 2 * cosI * n[0], d[1] + 2 * cosI * n[1], d[2] + 2 * cosI * n[2]], false]
  const eta = n1 / n2, g = eta * cosI - cosT
  return [[eta * d[0] + g * n[0], eta * d[1] + g * n[1], eta * d[2] + g * n[2]], true]
}

export function referenceTrace(s: RefStack, rays: number, seed: number) {
  const st = createRngState()
  const u = () => nextUniform(st)
  const a = s.diameterUm / 2, h = s.sagUm, R = (a * a + h * h) / (2 * h), t = s.tUm
  const hex = s.lattice === 'hexagonal', p = s.pitchUm
  const site = (i: number, j: number): [number, number] => (hex ? [(i + j / 2) * p, (j * p * Math.sqrt(3)) / 2] : [i * p, j * p])
  const toLattice = (x: number, y: number): [number, number] => (hex ? [x / p - y / (p * Math.sqrt(3)), (2 * y) / (p * Math.sqrt(3))] : [x / p, y / p])
  /** Sphere roots of a ray against the cap of site (sx, sy), only points with z ≥ t. */
  const capRoots = (P: V, d: V, sx: number, sy: number): number[] => {
    const c: V = [sx, sy, t + h - R]
    const o: V = [P[0] - c[0], P[1] - c[1], P[2] - c[2]]
    const B = dot(o, d), C = dot(o, o) - R * R, disc = B * B - C
    if (disc < 0) return []
    const q = Math.sqrt(disc)
    return [-B - q, -B + q].filter((tau) => P[2] + tau * d[2] >= t - 1e-9)
  }
  const normalAt = (X: V, sx: number, sy: number): V => [(X[0] - sx) / R, (X[1] - sy) / R, (X[2] - (t + h - R)) / R]
  const out = { rays, extracted: 0, reflector: 0, waveguided: 0, trapped: 0, unresolved: 0 }
  for (let r = 0; r < rays; r++) {
    seedRay(st, seed, 7, r)
    const u1 = u(), u2 = u()
    let P: V = hex ? [p * (u1 + 0.5 * u2), (p * Math.sqrt(3) * u2) / 2, 0] : [p * u1, p * u2, 0]
    const mu = 2 * u() - 1, phi = 2 * Math.PI * u(), sn = Math.sqrt(1 - mu * mu)
    let d: V = [sn * Math.cos(phi), sn * Math.sin(phi), mu]
    let where: 'emitter' | 'substrate' | 'lens' | 'air' = 'emitter'
    let cap: [number, number] = [0, 0]
    let justLeft: [number, number] | null = null
    let fate: keyof typeof out | null = null
    for (let ev = 0; ev < 10000 && !fate; ev++) {
      if (where === 'emitter') {
        if (d[2] < 0) {
          if (u() >= s.rb) { fate = 'reflector'; break }
          if (u() < s.fd) { const m = Math.sqrt(u()), f = 2 * Math.PI * u(), q = Math.sqrt(1 - m * m); d = [q * Math.cos(f), q * Math.sin(f),
            m] } else d = [d[0], d[1], -d[2]]
          continue
        }
        if (fresnel(d[2], s.nE, s.nS).R === 1) { fate = 'waveguided'; break }
        const [nd, through] = cross(d, [0, 0, -1], s.nE, s.nS, u())
        d = nd
        if (through) where = 'substrate'
      } else if (where === 'substrate') {
        if (d[2] < 0) {
          const tau = -P[2] / d[2]
          P = [P[0] + tau * d[0], P[1] + tau * d[1], 0]
          const [nd, through] = cross(d, [0, 0, 1], s.nS, s.nE, u())
          d = nd
          if (through) where = 'emitter'
          continue
        }
        const tau = (t - P[2]) / d[2]
        P = [P[0] + tau * d[0], P[1] + tau * d[1], t]
        const [li, lj] = toLattice(P[0], P[1])
        let inside: [number, number] | null = null
        for (let i = Math.floor(li) - 2; i <= Math.floor(li) + 2 && !inside; i++) for (let j = Math.floor(lj) - 2; j <= Math.floor(lj) + 2; j++) {
          const [sx, sy] = site(i, j)
          if ((P[0] - sx) ** 2 + (P[1] - sy) ** 2 < a * a) { inside = [sx, sy]; break }
        }
        if (inside) { where = 'lens'; cap = inside; continue }
        const [nd, through] = cross(d, [0, 0, -1], s.nS, 1, u())
        d = nd
        if (through) { where = 'air'; justLeft = null }
      } else if (where === 'lens') {
        const roots = capRoots(P, d, cap[0], cap[1]).filter((tau) => tau > 1e-9 * R)
        const tS = roots.length ? Math.max(...roots) : Infinity
        const tB = d[2] < 0 ? (t - P[2]) / d[2] : Infinity
        if (tB < tS) { P = [P[0] + tB * d[0], P[1] + tB * d[1], t]; where = 'substrate'; continue }
        if (tS === Infinity) { fate = 'unresolved'; break }
        P = [P[0] + tS * d[0], P[1] + tS * d[1], P[2] + tS * d[2]]
        const n = normalAt(P, cap[0], cap[1])
        const [nd, through] = cross(d, [-n[0], -n[1], -n[2]], s.nS, 1, u())
        d = nd
        if (through) { where = 'air'; justLeft = cap }
      } else {
        if (d[2] >= 0 && P[2] >= t + h) { fate = 'extracted'; break }
        const tz = d[2] > 0 ? (t + h - P[2]) / d[2] : d[2] < 0 ? (t - P[2]) / d[2] : Infinity
        const hs = Math.hypot(d[0], d[1])
        const reach = Math.min(hs * tz, 200 * p) + a + p
        const [li, lj] = toLattice(P[0], P[1])
        const span = Math.ceil(reach / p) + 2
        let best = Infinity, bcap: [number, number] = [0, 0]
        for (let i = Math.floor(li) - span - 1; i <= Math.floor(li) + span + 1; i++) for (let j = Math.floor(lj) - span; j <= Math.floor(lj) + span; j++) {
          const [sx, sy] = site(i, j)
          if (justLeft && sx === justLeft[0] && sy === justLeft[1]) continue
          // only sites whose disc the horizontal path can reach
          const wx = sx - P[0], wy = sy - P[1]
          if (hs > 0 && Math.abs(wx * d[1] - wy * d[0]) / hs > a) continue
          for (const tau of capRoots(P, d, sx, sy)) if (tau > 1e-9 * R && tau < best) { best = tau; bcap = [sx, sy] }
        }
        if (best < Infinity) {
          P = [P[0] + best * d[0], P[1] + best * d[1], P[2] + best * d[2]]
          const n = normalAt(P, bcap[0], bcap[1])
          const [nd, through] = cross(d, n, 1, s.nS, u())
          d = nd
          if (through) { where = 'lens'; cap = bcap } else justLeft = bcap
          continue
        }
        if (hs * tz > 200 * p) { fate = 'unresolved'; break }
        if (d[2] > 0) { fate = 'extracted'; break }
        P = [P[0] + tz * d[0], P[1] + tz * d[1], t]
        const [nd, through] = cross(d, [0, 0, 1], 1, s.nS, u())
        d = nd
        if (through) where = 'substrate'
        else justLeft = null
      }
    }
    out[fate ?? 'unresolved']++
  }
  return out
}
