// The stack tabulated over a wavelength grid: per wavelength the Purcell factors, the mode split, the flat-device
// outcoupling, the angular power entering the glass per polarisation and the stack's reflectance seen from the
// glass, on a shared glass-angle grid. Cached under a stable hash of (stack, glass optics, grids), so a design
// version's table is computed once per worker. Wavelengths nm, angles rad.
import type { ThinFilm } from '../../types/thin-film'
import { glassAngular, thinFilmAt, type ThinFilmOptics, type ThinFilmPoint } from './dipole'
import { prepareStack, stackReflectance } from './stack'

/** 380–780 nm in 5 nm steps: 81 wavelengths (the visible range at the CIE tables' common spacing). */
export const DEFAULT_WAVELENGTHS_NM: readonly number[] = Array.from({ length: 81 }, (_, i) => 380 + 5 * i)
/** Glass angles 0°–90° in 1° steps. */
export const DEFAULT_GLASS_ANGLE_COUNT = 91

export interface ThinFilmTable {
  key: string
  wavelengthsNm: number[]
  /** glass angles, rad, from the normal */
  glassAnglesRad: Float64Array
  points: ThinFilmPoint[]
  /** [wavelength × angle] power into the glass per sr, fraction of F, s and p */
  glassS: Float64Array
  glassP: Float64Array
  /** [wavelength × angle] stack reflectance seen from the glass, s and p */
  stackRs: Float64Array
  stackRp: Float64Array
}

/** cyrb53 (a public-domain 53-bit string hash): stable across runs and platforms, collisions ~2⁻⁵³ per pair. */
export function hash53(str: string): string {
  let h1 = 0xdeadbeef, h2 = 0x41c6ce57
  for (let i = 0; i < str.length; i++) {
    const c = str.charCodeAt(i)
    h1 = Math.imul(h1 ^ c, 2654435761)
    h2 = Math.imul(h2 ^ c, 1597334677)
  }
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507) ^ Math.imul(h2 ^ (h2 >>> 13), 3266489909)
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507) ^ Math.imul(h1 ^ (h1 >>> 13), 3266489909)
  return (4294967296 * (2097151 & h2) + (h1 >>> 0)).toString(16).padStart(14, '0')
}

/** Stable key: fields listed explicitly (names are labels and do not change the optics). */
export function thinFilmCacheKey(tf: ThinFilm, wavelengthsNm: readonly number[], optics: ThinFilmOptics, angleCount = DEFAULT_GLASS_ANGLE_COUNT): string {
  const canon = {
    l: tf.layers.map((l) => [l.thicknessNm, l.material.table ?? [l.material.n, l.material.k], l.emitting ? 1 : 0]),
    c: tf.cathode.material.table ?? [tf.cathode.material.n, tf.cathode.material.k],
    z: tf.emitterPositionNm, h: tf.horizontalDipoleFraction, q: tf.radiativeEfficiency,
    g: [optics.glassIndex, optics.glassThicknessUm ?? 0, optics.glassAbsorptionPerMm ?? 0, optics.outsideIndex ?? 1],
    w: wavelengthsNm, a: angleCount,
  }
  return `tf1-${hash53(JSON.stringify(canon))}`
}

const cache = new Map<string, ThinFilmTable>()
/** Tables kept per process (each ~0.3 MB for 81 × 91): enough for a sweep's neighbouring cells. */
const CACHE_ENTRIES = 32

export function computeThinFilmTable(tf: ThinFilm, wavelengthsNm: readonly number[], optics: ThinFilmOptics,
  angleCount = DEFAULT_GLASS_ANGLE_COUNT): ThinFilmTable {
  const W = wavelengthsNm.length, A = angleCount
  const glassAnglesRad = new Float64Array(A)
  for (let i = 0; i < A; i++) glassAnglesRad[i] = (i / (A - 1)) * (Math.PI / 2)
  const t: ThinFilmTable = {
    key: thinFilmCacheKey(tf, wavelengthsNm, optics, angleCount), wavelengthsNm: [...wavelengthsNm], glassAnglesRad, points: [],
    glassS: new Float64Array(W * A), glassP: new Float64Array(W * A), stackRs: new Float64Array(W * A), stackRp: new Float64Array(W * A),
  }
  for (let wi = 0; wi < W; wi++) {
    const lam = wavelengthsNm[wi]!
    const pt = thinFilmAt(tf, lam, optics)
    t.points.push(pt)
    const g = glassAngular(tf, lam, optics, glassAnglesRad, pt.purcell.mixed)
    t.glassS.set(g.s, wi * A)
    t.glassP.set(g.p, wi * A)
    const P = prepareStack(tf, optics.glassIndex, lam)
    for (let i = 0; i < A; i++) {
      const r = stackReflectance(P, glassAnglesRad[i]!)
      t.stackRs[wi * A + i] = r.rs
      t.stackRp[wi * A + i] = r.rp
    }
  }
  return t
}

/** The cached table (computed on a miss). */
export function thinFilmTable(tf: ThinFilm, wavelengthsNm: readonly number[] = DEFAULT_WAVELENGTHS_NM, optics: ThinFilmOptics,
  angleCount = DEFAULT_GLASS_ANGLE_COUNT): ThinFilmTable {
  const key = thinFilmCacheKey(tf, wavelengthsNm, optics, angleCount)
  const hit = cache.get(key)
  if (hit) return hit
  const t = computeThinFilmTable(tf, wavelengthsNm, optics, angleCount)
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!)
  cache.set(key, t)
  return t
}
