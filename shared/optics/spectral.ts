// Wavelength in the core: each ray of a scenario with an emission spectrum draws its wavelength (one uniform,
// after its launch direction and polarisation) from the spectrum's inverse CDF on a fixed grid, and its indices
// and the extra absorption 4πk/λ of the substrate and lens are read off tables on the same grid (linear between
// nodes; for a Sellmeier or Cauchy formula over ≥ 0.1 nm spacing that is below 1e-7 in n). Without a spectrum
// nothing here runs and the ray stream is as before (monochromatic 550 nm, indices evaluated there).
// Packed block (at scene[S_SPECTRAL_OFFSET]): [λ0 nm, Δλ nm, then SPECTRAL_GRID + 1 values each of: cdf, nE, nS,
// nL, αS (1/µm), αL (1/µm)]; node j is at λ0 + jΔλ, cell j spans nodes j and j + 1.
import { extinctionAt, indexAt, spectrumRangeNm, tableAt, type IndexModel, type Scenario, type Spectrum } from '../types/scenario'

export const SPECTRAL_GRID = 1024
const K1 = SPECTRAL_GRID + 1
export const SP_CDF = 2
export const SP_NE = SP_CDF + K1
export const SP_NS = SP_NE + K1
export const SP_NL = SP_NS + K1
export const SP_AS = SP_NL + K1
export const SP_AL = SP_AS + K1
export const SPECTRAL_BLOCK_LENGTH = SP_AL + K1

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
  let acc = 0
  out[SP_CDF] = 0
  for (let j = 0; j < K; j++) {
    acc += 'wavelengthNm' in sp ? 1 : spectralPower(sp, l0 + (j + 0.5) * dl)
    out[SP_CDF + j + 1] = acc
  }
  for (let j = 1; j <= K; j++) out[SP_CDF + j] = out[SP_CDF + j]! / acc
  out[SP_CDF + K] = 1
  for (let j = 0; j <= K; j++) {
    const nm = l0 + j * dl
    out[SP_NE + j] = indexAt(sc.emitter.index, nm)
    out[SP_NS + j] = indexAt(sc.substrate.index, nm)
    out[SP_NL + j] = indexAt(lensIndex, nm)
    out[SP_AS + j] = alphaAt(sc.substrate.index, nm, base)
    out[SP_AL + j] = alphaAt(lensIndex, nm, base)
  }
  return out
}

/**
 * Draws a wavelength from the block at `at` with uniform u: writes the cell index into cellOut[0] and the fraction
 * within it into cellOut[1]; returns λ in nm. Inverse CDF, uniform within the cell.
 */
export function sampleWavelength(scene: Float64Array, at: number, u: number, cellOut: Float64Array): number {
  let lo = 0, hi = SPECTRAL_GRID
  const c = at + SP_CDF
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (scene[c + mid]! <= u) lo = mid; else hi = mid }
  const a = scene[c + lo]!, b = scene[c + lo + 1]!
  const f = b > a ? (u - a) / (b - a) : 0
  cellOut[0] = lo; cellOut[1] = f
  return scene[at]! + (lo + f) * scene[at + 1]!
}

/** Table `slot` (SP_NE … SP_AL) of the block at `at`, interpolated in cell j at fraction f. */
export function spectralValue(scene: Float64Array, at: number, slot: number, j: number, f: number): number {
  const a = scene[at + slot + j]!
  return a + f * (scene[at + slot + j + 1]! - a)
}
