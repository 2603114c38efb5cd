// Wavelength in the core: each ray of a scenario with an emission spectrum draws its wavelength (one uniform,
// after its launch direction and polarisation) from the spectrum's inverse CDF on a fixed grid, and its indices
// and the extra absorption 4πk/λ of the substrate and lens are read off tables on the same grid (linear between
// nodes; for a Sellmeier or Cauchy formula over ≥ 0.1 nm spacing that is below 1e-7 in n). Without a spectrum
// nothing here runs and the ray stream is as before (monochromatic 550 nm, indices evaluated there).
// Packed block (at scene[S_SPECTRAL_OFFSET]): [λ0 nm, Δλ nm, SPECTRAL_GRID guide entries, then SPECTRAL_GRID + 1
// nodes of SP_STRIDE values each: cdf, nE, nS, nL, αS (1/µm), αL (1/µm)]; node j is at λ0 + jΔλ, cell j spans nodes
// j and j + 1. A node's values sit together so one ray's draw reads two adjacent nodes (two cache lines) rather than
// six tables. Guide entry k is the last cell whose cdf is ≤ k/SPECTRAL_GRID: the inverse-CDF search starts there and
// steps up (one or two steps for a smooth spectrum) instead of bisecting ten times; it lands on the same cell as a
// bisection would (the unique j with cdf[j] ≤ u < cdf[j + 1]), so the ray stream is unchanged.
import { extinctionAt, indexAt, spectrumRangeNm, tableAt, type IndexModel, type Scenario, type Spectrum } from '../types/scenario'

export const SPECTRAL_GRID = 1024
export const SP_GUIDE = 2
/** Where node 0 starts, and the values per node; fields within a node: */
export const SP_NODES = SP_GUIDE + SPECTRAL_GRID
export const SP_STRIDE = 6
export const SP_CDF = 0
export const SP_NE = 1
export const SP_NS = 2
export const SP_NL = 3
export const SP_AS = 4
export const SP_AL = 5
export const SPECTRAL_BLOCK_LENGTH = SP_NODES + (SPECTRAL_GRID + 1) * SP_STRIDE

/** Offset (from the block's start) of field `slot` of node j. */
export function spectralSlot(j: number, slot: number): number {
  return SP_NODES + j * SP_STRIDE + slot
}

/** Relative spectral power at `nm` (a line has no density: the caller handles it). */
function spectralPower(sp: Spectrum, nm: number): number {
  if ('peakNm' in sp) {
    const sigma = sp.fwhmNm / (2 * Math.sqrt(2 * Math.LN2))
    const d = (nm - sp.peakNm) / sigma
    return Math.exp(-0.5 * d * d)
  }
  if ('table' in sp) {
    const t = sp.table
    return nm < t[0]![0] || nm > t[t.length - 1]![0] ? 0 : tableAt(t, nm, 1)
  }
  return 1
}

/** α = 4πk/λ in 1/µm plus the scenario's absorption (1/µm). */
function alphaAt(m: IndexModel, nm: number, basePerUm: number): number {
  return basePerUm + (4 * Math.PI * extinctionAt(m, nm)) / (nm / 1000)
}

/** The packed spectral block of a scenario with a spectrum (lens index: the lens's, or the substrate's). */
export function buildSpectralBlock(sc: Scenario, lensIndex: IndexModel): Float64Array {
  const sp = sc.emitter.spectrum!
  const [l0, l1] = spectrumRangeNm(sp)
  const K = SPECTRAL_GRID
  const dl = (l1 - l0) / K
  const out = new Float64Array(SPECTRAL_BLOCK_LENGTH)
  out[0] = l0; out[1] = dl
  const base = sc.substrate.absorptionPerMm / 1000
  const cdf = (j: number) => SP_NODES + j * SP_STRIDE + SP_CDF
  let acc = 0
  out[cdf(0)] = 0
  for (let j = 0; j < K; j++) {
    acc += 'wavelengthNm' in sp ? 1 : spectralPower(sp, l0 + (j + 0.5) * dl)
    out[cdf(j + 1)] = acc
  }
  for (let j = 1; j <= K; j++) out[cdf(j)] = out[cdf(j)]! / acc
  out[cdf(K)] = 1
  buildGuide(out, 0)
  for (let j = 0; j <= K; j++) {
    const nm = l0 + j * dl, at = SP_NODES + j * SP_STRIDE
    out[at + SP_NE] = indexAt(sc.emitter.index, nm)
    out[at + SP_NS] = indexAt(sc.substrate.index, nm)
    out[at + SP_NL] = indexAt(lensIndex, nm)
    out[at + SP_AS] = alphaAt(sc.substrate.index, nm, base)
    out[at + SP_AL] = alphaAt(lensIndex, nm, base)
  }
  return out
}

/** The guide entries of the block at `at` in `s` from its cdf (entry k: the last cell whose cdf is ≤ k/SPECTRAL_GRID). */
function buildGuide(s: Float64Array, at: number): void {
  const K = SPECTRAL_GRID
  const cdf = (j: number) => at + SP_NODES + j * SP_STRIDE + SP_CDF
  for (let k = 0, lo = 0; k < K; k++) {
    while (lo < K - 1 && s[cdf(lo + 1)]! <= k / K) lo++
    s[at + SP_GUIDE + k] = lo
  }
}

/**
 * Reweights the wavelength draw of the block at `at` in `s` in place: cell j's probability times w(j), the cdf
 * renormalised and the guide rebuilt (a thin-film source weighs each cell by the power its stack sends into the glass).
 */
export function reweightSpectralCells(s: Float64Array, at: number, w: (j: number) => number): void {
  const K = SPECTRAL_GRID
  const cdf = (j: number) => at + SP_NODES + j * SP_STRIDE + SP_CDF
  const p = new Float64Array(K)
  for (let j = 0; j < K; j++) p[j] = (s[cdf(j + 1)]! - s[cdf(j)]!) * w(j)
  let acc = 0
  s[cdf(0)] = 0
  for (let j = 0; j < K; j++) { acc += p[j]!; s[cdf(j + 1)] = acc }
  for (let j = 1; j <= K; j++) s[cdf(j)] = s[cdf(j)]! / acc
  s[cdf(K)] = 1
  buildGuide(s, at)
}

/**
 * Draws a wavelength from the block at `at` with uniform u: writes the cell index into cellOut[0] and the fraction
 * within it into cellOut[1]; returns λ in nm. Inverse CDF, uniform within the cell.
 */
export function sampleWavelength(scene: Float64Array, at: number, u: number, cellOut: Float64Array): number {
  const c = at + SP_NODES + SP_CDF
  // the cell j with cdf[j] ≤ u < cdf[j + 1], from the guide entry of u (u·SPECTRAL_GRID is exact: a power of 2)
  let lo = scene[at + SP_GUIDE + ((u * SPECTRAL_GRID) | 0)]! | 0
  while (scene[c + (lo + 1) * SP_STRIDE]! <= u) lo++
  const a = scene[c + lo * SP_STRIDE]!, b = scene[c + (lo + 1) * SP_STRIDE]!
  const f = b > a ? (u - a) / (b - a) : 0
  cellOut[0] = lo; cellOut[1] = f
  return scene[at]! + (lo + f) * scene[at + 1]!
}

/** Field `slot` (SP_NE … SP_AL) of the block at `at`, interpolated in cell j at fraction f. */
export function spectralValue(scene: Float64Array, at: number, slot: number, j: number, f: number): number {
  const q = at + SP_NODES + j * SP_STRIDE + slot
  const a = scene[q]!
  return a + f * (scene[q + SP_STRIDE]! - a)
}
