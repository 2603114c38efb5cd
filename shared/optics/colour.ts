// Colour and photometry over viewing angle from the colour block of a tally (tally.ts; scenarios with a spectrum).
// Each ray is an equal quantum of radiant energy drawn from the emitter's spectral power distribution, so a count
// per 5 nm bin is the spectral radiant power there; CIE 1931 tristimulus values per 2° band are the CIE 5 nm
// summation X = Σ c_j x̄_j, Y = Σ c_j ȳ_j, Z = Σ c_j z̄_j (cie1931.ts; CIE 015:2018), chromaticity x = X/(X+Y+Z),
// y = Y/(X+Y+Z), CIE 1976 UCS u′ = 4X/(X+15Y+3Z), v′ = 9Y/(X+15Y+3Z), Δu′v′ = |(u′, v′) − (u′, v′)_on-axis band|.
// Photopic luminance per band is Σ c_j ȳ_j over the launched Σ n_j ȳ_j (the launched row: a Lambertian emitter of
// the same launched luminous flux puts the share sin²θb − sin²θa into the band), so it is luminance.relative
// weighted by V(λ) = ȳ(λ); luminous efficacy of the extracted radiation 683 lm/W · Σ e_j ȳ_j / Σ e_j over every
// extracted ray (those outside 377.5–782.5 nm count as radiant power with V = 0).
//
// Standard errors: first-order delta method over the multinomial counts of the (wavelength bin, fate) cells, fate
// being the ray's band or anything else. For f(m) of the counts, Var f = Σ_i (∂f/∂m_i)² m_i − (Σ_i ∂f/∂m_i m_i)²/N;
// every figure here is a ratio of counts (homogeneous of degree 0), so by Euler's theorem the second term vanishes
// and Var f = Σ_i (∂f/∂m_i)² m_i. Bands are disjoint cells, so a band's u′ and the on-axis band's u′ have no
// covariance in this approximation. Near Δu′v′ = 0 the first-order σ is the σ of the projection on the
// difference's direction (the norm's distribution is Rayleigh-like there; read Δu′v′ against 2–3 σ).
import type { ColourResult } from '../types/result'
import { CIE_X, CIE_Y, CIE_Z, cieRowNm, KM_LM_PER_W } from './cie1931'
import {
  COLOUR_AXIS_ROW, COLOUR_BAND_DEG, COLOUR_BANDS, COLOUR_BIN_NM, COLOUR_BINS, COLOUR_IN_RANGE_BINS, COLOUR_LAUNCH_ROW, hasColour,
  PIXEL_AXIS_BINS, T_COLOUR, type Tally,
} from './tally'

const DEG = Math.PI / 180
/** Bands whose centres are at most this (deg) enter maxDeltaUvTo60. */
export const COLOUR_MAX_SHIFT_TO_DEG = 60
/** Angles (deg) whose bands' spectra the result carries. */
export const COLOUR_SPECTRA_ANGLES_DEG = [0, 30, 60]
export const COLOUR_STD_ERR_METHOD = 'delta method (first order) over the multinomial band × wavelength counts'

// d_j = x̄ + 15ȳ + 3z̄, the u′v′ denominator's weight per bin
const CIE_D = CIE_X.map((x, j) => x + 15 * CIE_Y[j]! + 3 * CIE_Z[j]!)

interface BandColour { x: number; y: number; u: number; v: number; varX: number; varY: number; varU: number; varV: number; covUV: number }

/** Chromaticity of one row of counts with its delta-method (co)variances; null when the row holds no visible light. */
export function rowColour(t: Tally, row: number): BandColour | null {
  const at = T_COLOUR + row * COLOUR_BINS
  let X = 0, Y = 0, Z = 0
  for (let j = 0; j < COLOUR_IN_RANGE_BINS; j++) {
    const c = t[at + j]!
    X += c * CIE_X[j]!; Y += c * CIE_Y[j]!; Z += c * CIE_Z[j]!
  }
  const S = X + Y + Z
  const D = X + 15 * Y + 3 * Z
  if (!(S > 0) || !(D > 0)) return null
  const u = (4 * X) / D, v = (9 * Y) / D
  const x = X / S, y = Y / S
  let varX = 0, varY = 0, varU = 0, varV = 0, covUV = 0
  for (let j = 0; j < COLOUR_IN_RANGE_BINS; j++) {
    const c = t[at + j]!
    if (c === 0) continue
    // ∂x/∂c_j = (x̄_j − x s_j)/S, ∂y/∂c_j = (ȳ_j − y s_j)/S with s_j = x̄ + ȳ + z̄
    const sj = CIE_X[j]! + CIE_Y[j]! + CIE_Z[j]!
    const gx = (CIE_X[j]! - x * sj) / S, gy = (CIE_Y[j]! - y * sj) / S
    varX += c * gx * gx; varY += c * gy * gy
    // ∂u′/∂c_j = (4x̄_j − u′d_j)/D, ∂v′/∂c_j = (9ȳ_j − v′d_j)/D
    const gu = (4 * CIE_X[j]! - u * CIE_D[j]!) / D, gv = (9 * CIE_Y[j]! - v * CIE_D[j]!) / D
    varU += c * gu * gu; varV += c * gv * gv; covUV += c * gu * gv
  }
  return { x, y, u, v, varX, varY, varU, varV, covUV }
}

/** Δu′v′ of band b against the reference band a, with its delta-method σ (bands disjoint: variances add). */
export function deltaUvOf(b: BandColour, a: BandColour): { value: number; stdErr: number } {
  const du = b.u - a.u, dv = b.v - a.v
  const d = Math.hypot(du, dv)
  if (d === 0) {
    // no direction to project on: the σ of one component of the difference (both components' mean variance)
    return { value: 0, stdErr: Math.sqrt((b.varU + a.varU + b.varV + a.varV) / 2) }
  }
  const q = du * du * (b.varU + a.varU) + dv * dv * (b.varV + a.varV) + 2 * du * dv * (b.covUV + a.covUV)
  return { value: d, stdErr: Math.sqrt(Math.max(0, q)) / d }
}

/**
 * Photopic share of row `row` against the launched row: R = Σ c_j ȳ_j / Σ n_j ȳ_j, with
 * Var R = Σ_j ȳ_j² [c_j (1 − R)² + (n_j − c_j) R²] / W² (the row's cells and the rest of the launched ones).
 */
function photopicShare(t: Tally, row: number): { value: number; stdErr: number } {
  const at = T_COLOUR + row * COLOUR_BINS, ln = T_COLOUR + COLOUR_LAUNCH_ROW * COLOUR_BINS
  let S = 0, W = 0
  for (let j = 0; j < COLOUR_IN_RANGE_BINS; j++) { S += t[at + j]! * CIE_Y[j]!; W += t[ln + j]! * CIE_Y[j]! }
  if (!(W > 0)) return { value: 0, stdErr: 0 }
  const R = S / W
  let q = 0
  for (let j = 0; j < COLOUR_IN_RANGE_BINS; j++) {
    const c = t[at + j]!, n = t[ln + j]!, y2 = CIE_Y[j]! * CIE_Y[j]!
    q += y2 * (c * (1 - R) * (1 - R) + (n - c) * R * R)
  }
  return { value: R, stdErr: Math.sqrt(q) / W }
}

/** The colour figures of a tally's colour block, or null when the tally has none (no spectrum). */
export function colourOf(t: Tally): ColourResult | null {
  if (!hasColour(t)) return null
  const bands: Array<BandColour | null> = []
  for (let b = 0; b < COLOUR_BANDS; b++) bands.push(rowColour(t, b))
  const ref = bands[0] ?? null
  const bandCentersDeg: number[] = [], x: Array<number | null> = [], y: Array<number | null> = []
  const xStdErr: Array<number | null> = [], yStdErr: Array<number | null> = []
  const uPrime: Array<number | null> = [], vPrime: Array<number | null> = [], uPrimeStdErr: Array<number | null> = [], vPrimeStdErr: Array<number | null> = []
  const deltaUv: Array<number | null> = [], deltaUvStdErr: Array<number | null> = []
  const photopicRelative: Array<number | null> = [], photopicRelativeStdErr: Array<number | null> = []
  let maxD = ref ? 0 : NaN, maxDErr = ref ? 0 : NaN
  for (let b = 0; b < COLOUR_BANDS; b++) {
    const c = bands[b]
    const centre = COLOUR_BAND_DEG * b + COLOUR_BAND_DEG / 2
    bandCentersDeg.push(centre)
    x.push(c ? c.x : null); y.push(c ? c.y : null)
    xStdErr.push(c ? Math.sqrt(c.varX) : null); yStdErr.push(c ? Math.sqrt(c.varY) : null)
    uPrime.push(c ? c.u : null); vPrime.push(c ? c.v : null)
    uPrimeStdErr.push(c ? Math.sqrt(c.varU) : null); vPrimeStdErr.push(c ? Math.sqrt(c.varV) : null)
    if (c && ref) {
      const d = b === 0 ? { value: 0, stdErr: 0 } : deltaUvOf(c, ref)
      deltaUv.push(d.value); deltaUvStdErr.push(d.stdErr)
      if (centre <= COLOUR_MAX_SHIFT_TO_DEG && d.value > maxD) { maxD = d.value; maxDErr = d.stdErr }
    } else { deltaUv.push(null); deltaUvStdErr.push(null) }
    // a Lambertian emitter of the launched luminous flux puts sin²θb − sin²θa of it into the band
    const lamb = Math.sin((b + 1) * COLOUR_BAND_DEG * DEG) ** 2 - Math.sin(b * COLOUR_BAND_DEG * DEG) ** 2
    const p = photopicShare(t, b)
    photopicRelative.push(c ? p.value / lamb : null); photopicRelativeStdErr.push(c ? p.stdErr / lamb : null)
  }
  const axis = photopicShare(t, COLOUR_AXIS_ROW)
  const axisLamb = Math.sin(PIXEL_AXIS_BINS * DEG) ** 2
  // luminous efficacy over every extracted ray (the band rows, out-of-range bin included with V = 0)
  const e = new Float64Array(COLOUR_BINS)
  for (let b = 0; b < COLOUR_BANDS; b++) for (let j = 0; j < COLOUR_BINS; j++) e[j] = e[j]! + t[T_COLOUR + b * COLOUR_BINS + j]!
  let C = 0, SV = 0
  for (let j = 0; j < COLOUR_BINS; j++) { C += e[j]!; if (j < COLOUR_IN_RANGE_BINS) SV += e[j]! * CIE_Y[j]! }
  const vMean = C > 0 ? SV / C : 0
  let q = 0
  for (let j = 0; j < COLOUR_BINS; j++) { const dv = (j < COLOUR_IN_RANGE_BINS ? CIE_Y[j]! : 0) - vMean; q += e[j]! * dv * dv }
  const wavelengthCentersNm = Array.from({ length: COLOUR_IN_RANGE_BINS }, (_, j) => cieRowNm(j))
  const spectraBands = COLOUR_SPECTRA_ANGLES_DEG.map((a) => Math.min(COLOUR_BANDS - 1, Math.floor(a / COLOUR_BAND_DEG)))
  const relative = spectraBands.map((b) => {
    const at = T_COLOUR + b * COLOUR_BINS
    let peak = 0
    for (let j = 0; j < COLOUR_IN_RANGE_BINS; j++) if (t[at + j]! > peak) peak = t[at + j]!
    return wavelengthCentersNm.map((_, j) => (peak > 0 ? t[at + j]! / peak : 0))
  })
  return {
    bandWidthDeg: COLOUR_BAND_DEG,
    bandCentersDeg,
    x, y, xStdErr, yStdErr, uPrime, vPrime, uPrimeStdErr, vPrimeStdErr, deltaUv, deltaUvStdErr, photopicRelative, photopicRelativeStdErr,
    maxDeltaUvTo60: maxD,
    maxDeltaUvTo60StdErr: maxDErr,
    photopicOnAxisRelative: axis.value / axisLamb,
    photopicOnAxisRelativeStdErr: axis.stdErr / axisLamb,
    luminousEfficacyLmPerW: KM_LM_PER_W * vMean,
    luminousEfficacyStdErrLmPerW: C > 0 ? (KM_LM_PER_W * Math.sqrt(q)) / C : 0,
    wavelengthBinNm: COLOUR_BIN_NM,
    wavelengthCentersNm,
    // the bands containing 0, 30 and 60° (their centres: 1, 31, 61°)
    spectra: { anglesDeg: spectraBands.map((b) => COLOUR_BAND_DEG * b + COLOUR_BAND_DEG / 2), relative },
    stdErrMethod: COLOUR_STD_ERR_METHOD,
  }
}
