// The OLED stack as the ray source and as the bottom of the glass. Per wavelength node of the scenario's grid, the
// power the dipoles send into the glass (dipole.ts: per sr, per polarisation, fraction of the dipole power F) is
// turned into inverse-CDF tables over the glass angle, and the stack's complex reflection coefficients r_s, r_p seen
// from the glass (stack.ts: Airy recursion through every layer to the cathode; r_p on the magnetic field, so a
// perfect conductor gives r_s = −1, r_p = +1, the convention of crossings.ts) are tabulated on the same angles.
// Rays then start in the glass just above the stack (z = 0, going up) and reflect off it with those coefficients.
// Wavelength nodes: the spectrum's range in steps of at most TF_STEP_NM (one node for a line or no spectrum, at
// 550 nm); a ray uses the node nearest to the midpoint of its spectral cell (spectral.ts). The spectral weight of a
// wavelength is the emitter's spectrum S(λ) times F(λ) (the cavity changes the emission rate per wavelength: Furno
// et al., Phys. Rev. B 85, 115205 (2012)); the traced rays carry only the share G(λ) that enters the glass, so the
// ray wavelength density is ∝ S·F·G and every traced fraction is scaled by G = ΣS·F·G/ΣS·F to become a fraction of
// all dipole power. Glass angles θ from the normal in rad; wavelengths nm.
//
// Packed block (scene[S_THINFILM_OFFSET]): [W nodes, λ0 nm, Δλ nm, A emission cells, RA reflection cells,
// μ_0..μ_A (μ_k = cos(k·90°/A)), then per node: p_s (probability that a ray is s-polarised), cdf_s[0..A],
// cdf_p[0..A], Re r_s, Im r_s, Re r_p, Im r_p [0..RA each, at μ_k = k/RA], guide_s, guide_p [TF_GUIDE each]]. Within
// a cell of the angle grid μ is drawn uniformly (the power per dμ is taken constant over a 0.35° cell; the exact
// answer in flat.ts integrates the unbinned power, and the two agree to ~1e-5). Guide entry g of a polarisation is
// the last cell whose cdf is ≤ g/TF_GUIDE: the inverse-CDF search starts there and steps up instead of bisecting
// eight times (a mispredicted branch each); it lands on the cell bisection would (the unique k with
// cdf[k] ≤ u < cdf[k + 1]), so the ray stream is unchanged (as spectral.ts's guide).
import { DEFAULT_WAVELENGTH_NM, indexAt, spectrumRangeNm, type Scenario } from '../../types/scenario'
import type { ThinFilm } from '../../types/thin-film'
import { buildSpectralBlock, SP_CDF, SPECTRAL_GRID, spectralSlot } from '../spectral'
import { glassAngular, thinFilmAt, type ThinFilmPoint } from './dipole'
import { airy, prepareStack, setAdmittance, setKappa } from './stack'
import { hash53 } from './table'

/** Glass-angle cells over 0–90° of the emission tables (0.35° each). */
export const TF_ANGLE_CELLS = 256
/**
 * Cells of the stack's reflection tables, uniform in μ = cos θ over [0, 1]: r depends on the glass angle through
 * κ² = n_g²(1 − μ²) and the glass admittance n_g·μ, both smooth in μ at both ends, and a ray's μ is its −dz (no acos
 * per hit). r turns by up to ~0.1 rad per degree in a 200 nm stack; linear interpolation of the complex r loses
 * |r|² ∝ (Δφ)²/8 per cell, ≲ 1e-5 with 1024 cells.
 */
export const TF_REFLECTION_CELLS = 1024
/** Largest spacing of the wavelength nodes (nm): the stack's response changes over tens of nm. */
export const TF_STEP_NM = 5
/** Guide entries per polarisation and node (a power of 2, so u·TF_GUIDE is exact; 2 per emission cell). */
export const TF_GUIDE = 512
/** Header entries of the block ([W, λ0, Δλ, A, RA]); the μ grid follows, then the nodes. */
export const TF_HEADER = 5
/** Values per wavelength node of a block with A emission and RA reflection cells. */
export const thinFilmNodeLength = (A: number, RA: number) => 1 + 2 * (A + 1) + 4 * (RA + 1) + 2 * TF_GUIDE
const nodeLength = thinFilmNodeLength

export interface ThinFilmNode {
  wavelengthNm: number
  glassIndex: number
  point: ThinFilmPoint
  /** Glass share G = glassS + glassP (fraction of the dipole power at this wavelength). */
  glass: number
  /** Spectral weight S·F of the node (normalised over the nodes to sum 1). */
  weight: number
}

export interface ThinFilmSource {
  key: string
  stack: ThinFilm
  nodes: ThinFilmNode[]
  /** Overall glass share ΣS·F·G/ΣS·F: the factor turning traced fractions into fractions of all dipole power. */
  glassShare: number
  /** Per spectral cell (spectral.ts grid), the node it uses; empty without a spectrum. */
  cellNode: Int32Array
  /** The packed block (see the file header). */
  block: Float64Array
}

/** The wavelength nodes of a scenario (nm). */
export function thinFilmWavelengths(sc: Scenario): number[] {
  const sp = sc.emitter.spectrum
  if (sp === undefined) return [DEFAULT_WAVELENGTH_NM]
  const [l0, l1] = spectrumRangeNm(sp)
  if (!(l1 > l0)) return [l0]
  const n = Math.max(2, Math.ceil((l1 - l0) / TF_STEP_NM - 1e-9) + 1)
  return Array.from({ length: n }, (_, i) => l0 + ((l1 - l0) * i) / (n - 1))
}

/** The node index of a wavelength in a packed block (nearest node). */
export function thinFilmNode(scene: Float64Array, at: number, wavelengthNm: number): number {
  const W = scene[at]!
  if (W === 1) return 0
  let i = Math.round((wavelengthNm - scene[at + 1]!) / scene[at + 2]!)
  if (i < 0) i = 0
  if (i > W - 1) i = W - 1
  return i
}

const cache = new Map<string, ThinFilmSource>()
/** Sources kept per process (a 49-node spectrum is ~0.6 MB): enough for the cells of a sweep sharing a stack. */
const CACHE_ENTRIES = 16

/** What the source depends on: the stack, the glass index model and the spectrum (never the lens or glass thickness). */
export function thinFilmSourceKey(sc: Scenario): string {
  return `tfs1-${hash53(JSON.stringify([sc.emitter.thinFilm, sc.substrate.index, sc.emitter.spectrum ?? null, TF_ANGLE_CELLS, TF_STEP_NM]))}`
}

/** The scenario's thin-film source (computed on a miss, then kept in a small LRU on this thread). */
export function thinFilmSource(sc: Scenario): ThinFilmSource {
  const key = thinFilmSourceKey(sc)
  const hit = cache.get(key)
  if (hit) {
    cache.delete(key); cache.set(key, hit) // most recently used last
    return hit
  }
  const src = computeThinFilmSource(sc, key)
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!)
  cache.set(key, src)
  return src
}

const rt = new Float64Array(4)

/** Builds the source without the cache (the bench times this). */
export function computeThinFilmSource(sc: Scenario, key = thinFilmSourceKey(sc)): ThinFilmSource {
  const tf = sc.emitter.thinFilm
  if (tf === undefined) throw new Error('the scenario has no thin-film stack')
  const lams = thinFilmWavelengths(sc)
  const W = lams.length, A = TF_ANGLE_CELLS, RA = TF_REFLECTION_CELLS
  const NL = nodeLength(A, RA)
  const block = new Float64Array(TF_HEADER + (A + 1) + W * NL)
  block[0] = W; block[1] = lams[0]!; block[2] = W > 1 ? lams[1]! - lams[0]! : 0; block[3] = A; block[4] = RA
  const angles = new Float64Array(A + 1)
  for (let k = 0; k <= A; k++) {
    angles[k] = (k * (Math.PI / 2)) / A
    block[TF_HEADER + k] = Math.cos(angles[k]!)
  }
  block[TF_HEADER + A] = 0 // cos 90° rounds to 6e-17
  // spectral weights of the nodes: the spectrum's cells, each given to its nearest node
  const cellNode = new Int32Array(sc.emitter.spectrum === undefined ? 0 : SPECTRAL_GRID)
  const spectrumWeight = new Float64Array(W)
  if (sc.emitter.spectrum === undefined) spectrumWeight[0] = 1
  else {
    const sp = buildSpectralBlock(sc, sc.substrate.index)
    const l0 = sp[0]!, dl = sp[1]!
    for (let j = 0; j < SPECTRAL_GRID; j++) {
      const node = W === 1 ? 0 : Math.min(W - 1, Math.max(0, Math.round((l0 + (j + 0.5) * dl - block[1]!) / block[2]!)))
      cellNode[j] = node
      spectrumWeight[node] = spectrumWeight[node]! + (sp[spectralSlot(j + 1, SP_CDF)]! - sp[spectralSlot(j, SP_CDF)]!)
    }
  }
  const nodes: ThinFilmNode[] = []
  let sumSF = 0, sumSFG = 0
  for (let i = 0; i < W; i++) {
    const lam = lams[i]!
    const tfl = tf // materials are read at λ by prepareStack (stack.ts)
    const glassIndex = indexAt(sc.substrate.index, lam)
    const optics = { glassIndex }
    const point = thinFilmAt(tfl, lam, optics)
    const F = point.purcell.mixed
    const g = glassAngular(tfl, lam, optics, angles, F)
    const base = TF_HEADER + (A + 1) + i * NL
    const glass = point.glassS + point.glassP
    block[base] = glass > 0 ? point.glassS / glass : 0.5
    // inverse-CDF tables: cell k carries 2π·(P_k + P_k+1)/2·(μ_k − μ_k+1) (trapezoid in μ)
    for (let pol = 0; pol < 2; pol++) {
      const P = pol === 0 ? g.s : g.p
      const c = base + 1 + pol * (A + 1)
      let acc = 0
      block[c] = 0
      for (let k = 0; k < A; k++) {
        acc += 0.5 * (P[k]! + P[k + 1]!) * (block[TF_HEADER + k]! - block[TF_HEADER + k + 1]!)
        block[c + k + 1] = acc
      }
      for (let k = 1; k <= A; k++) block[c + k] = acc > 0 ? block[c + k]! / acc : k / A
      block[c + A] = 1
      const gd = base + 1 + 2 * (A + 1) + 4 * (RA + 1) + pol * TF_GUIDE
      for (let g = 0, lo = 0; g < TF_GUIDE; g++) {
        while (lo < A - 1 && block[c + lo + 1]! <= g / TF_GUIDE) lo++
        block[gd + g] = lo
      }
    }
    // the stack's amplitude reflection seen from the glass, s and p
    const S = prepareStack(tfl, glassIndex, lam)
    const r = base + 1 + 2 * (A + 1)
    for (let k = 0; k <= RA; k++) {
      const mu = k / RA
      setKappa(S, glassIndex * Math.sqrt(1 - mu * mu))
      setAdmittance(S, false)
      airy(S, S.M - 1, 0, rt, 0)
      block[r + k] = rt[0]!; block[r + (RA + 1) + k] = rt[1]!
      setAdmittance(S, true)
      airy(S, S.M - 1, 0, rt, 0)
      block[r + 2 * (RA + 1) + k] = rt[0]!; block[r + 3 * (RA + 1) + k] = rt[1]!
    }
    const sf = spectrumWeight[i]! * F
    sumSF += sf; sumSFG += sf * glass
    nodes.push({ wavelengthNm: lam, glassIndex, point, glass, weight: sf })
  }
  for (const n of nodes) n.weight = sumSF > 0 ? n.weight / sumSF : 0
  return { key, stack: tf, nodes, glassShare: sumSF > 0 ? sumSFG / sumSF : 0, cellNode, block }
}

/**
 * A launch direction in the glass from node `node` of the block at `at`: polarisation s with probability p_s (uPol),
 * μ = cos θ by inverse CDF (uTheta; uniform in μ within the cell), φ = 2π·uPhi. Writes [dx, dy, dz] into out;
 * returns 1 for p, 0 for s.
 */
export function sampleThinFilmLaunch(scene: Float64Array, at: number, node: number, uPol: number, uTheta: number, uPhi: number, out: Float64Array): number {
  const A = scene[at + 3]!, RA = scene[at + 4]!
  const base = at + TF_HEADER + (A + 1) + node * nodeLength(A, RA)
  const isP = uPol < scene[base]! ? 0 : 1
  const c = base + 1 + isP * (A + 1)
  // the cell k with cdf[k] ≤ uTheta < cdf[k + 1], from the guide entry of uTheta
  let lo = scene[base + 1 + 2 * (A + 1) + 4 * (RA + 1) + isP * TF_GUIDE + ((uTheta * TF_GUIDE) | 0)]! | 0
  while (scene[c + lo + 1]! <= uTheta) lo++
  const a = scene[c + lo]!, b = scene[c + lo + 1]!
  const f = b > a ? (uTheta - a) / (b - a) : 0
  const muA = scene[at + TF_HEADER + lo]!, muB = scene[at + TF_HEADER + lo + 1]!
  const mu = muA + (muB - muA) * f
  const m2 = 1 - mu * mu
  const s = m2 > 0 ? Math.sqrt(m2) : 0 // clamp: rounding at μ → 1
  const phi = 2 * Math.PI * uPhi
  out[0] = s * Math.cos(phi)
  out[1] = s * Math.sin(phi)
  out[2] = mu
  return isP
}

/**
 * The stack's amplitude reflection for a ray meeting it from the glass with cos θ = cosI (linear in μ = cos θ
 * between the grid points): out = [Re r_s, Im r_s, Re r_p, Im r_p].
 */
export function stackCoefficients(scene: Float64Array, at: number, node: number, cosI: number, out: Float64Array): void {
  const A = scene[at + 3]!, RA = scene[at + 4]!
  const x = (cosI > 1 ? 1 : cosI) * RA
  let k = x | 0
  if (k > RA - 1) k = RA - 1
  const f = x - k
  const r = at + TF_HEADER + (A + 1) + node * nodeLength(A, RA) + 1 + 2 * (A + 1)
  const n = RA + 1
  let q = r + k, v = scene[q]!
  out[0] = v + f * (scene[q + 1]! - v)
  q += n; v = scene[q]!
  out[1] = v + f * (scene[q + 1]! - v)
  q += n; v = scene[q]!
  out[2] = v + f * (scene[q + 1]! - v)
  q += n; v = scene[q]!
  out[3] = v + f * (scene[q + 1]! - v)
}
