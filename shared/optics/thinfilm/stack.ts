// Coherent optics of a planar OLED stack: the glass (semi-infinite, below), layers 1..N (from the glass upward),
// the cathode (semi-infinite, above). Frame: z up, interfaces normal to z, every plane wave shares the in-plane
// wavevector k_x; κ = k_x/k0 is the effective index, k0 = 2π/λ in vacuum. In medium j (ε_j = (n_j + i k_j)²) the
// normal wavevector is k0·w_j with w_j = √(ε_j − κ²) on the branch Im ≥ 0. Lengths enter as k0·d (dimensionless).
//
// Interface admittances: s (TE) uses Y = w on the electric field; p (TM) uses Y = w/ε on the magnetic field, so that
// r = (Y_i − Y_j)/(Y_i + Y_j), t = 2Y_i/(Y_i + Y_j) and the power flux of a wave of amplitude a is ∝ Re(Y)|a|². With
// this p convention a perfect conductor gives r_s = −1, r_p = +1. The multilayer is reduced by the Airy recursion
// R_i = (r_ij + R_j e^{2iβ_j})/(1 + r_ij R_j e^{2iβ_j}), T_i = t_ij T_j e^{iβ_j}/(1 + r_ij R_j e^{2iβ_j}),
// β_j = k0·w_j·d_j (Born & Wolf, Principles of Optics, §1.6; Macleod, Thin-Film Optical Filters, ch. 2).
import { materialAt, type ThinFilm } from '../../types/thin-film'
import { cexpi, csqrtUpper } from './complex'

/** One wavelength's stack in the core's numeric form (media 0 = glass … M−1 = cathode). */
export interface PreparedStack {
  wavelengthNm: number
  M: number
  /** ε_j, real and imaginary parts */
  er: Float64Array
  ei: Float64Array
  /** k0 · thickness of each medium (0 for the two semi-infinite ones) */
  dk: Float64Array
  /** index of the emitting medium (1..N), or −1 when the stack has none */
  e: number
  /** real index of the emitting layer (the schema keeps it non-absorbing) */
  ne: number
  ng: number
  /** k0 · distance from the dipole plane down to the emitting layer's lower boundary, and up to its upper one */
  zm: number
  zp: number
  /** k0 · distance from the dipole to the nearest boundary across which ε changes (decay scale of u > 1 fields) */
  zNear: number
  /** scratch: w_j and the current admittances Y_j, (re, im) pairs */
  w: Float64Array
  y: Float64Array
}

/**
 * Im ε given to lossless non-emitting layers: 1e-6 (k ≈ 3e-7) lies far below any measured extinction of organics or
 * oxides in the visible (k ≳ 1e-4, from memory), so it moves F and the mode split by ~1e-6, yet it gives each guided
 * mode a width (δu ~ 1e-6) that the adaptive quadrature resolves once the pole is a breakpoint.
 */
export const LOSS_FLOOR = 1e-6

export function prepareStack(tf: ThinFilm, glassIndex: number, wavelengthNm: number): PreparedStack {
  const N = tf.layers.length
  const M = N + 2
  const er = new Float64Array(M)
  const ei = new Float64Array(M)
  const dk = new Float64Array(M)
  const k0 = (2 * Math.PI) / wavelengthNm
  const set = (j: number, n: number, k: number) => { er[j] = n * n - k * k; ei[j] = 2 * n * k }
  set(0, glassIndex, 0)
  let e = -1
  for (let i = 0; i < N; i++) {
    const l = tf.layers[i]!
    const m = materialAt(l.material, wavelengthNm)
    set(i + 1, m.n, m.k)
    // A lossless inner layer gets Im ε ≥ LOSS_FLOOR so guided modes (poles of 1/(1 − a₊a₋) on the real u axis,
    // delta functions of finite weight) become Lorentzians of that weight that the quadrature can integrate.
    if (!l.emitting && ei[i + 1]! < LOSS_FLOOR) ei[i + 1] = LOSS_FLOOR
    dk[i + 1] = k0 * l.thicknessNm
    if (l.emitting && e < 0) e = i + 1
  }
  const c = materialAt(tf.cathode.material, wavelengthNm)
  set(M - 1, c.n, c.k)
  let zm = 0, zp = 0, zNear = Infinity
  const ne = e > 0 ? materialAt(tf.layers[e - 1]!.material, wavelengthNm).n : glassIndex
  if (e > 0) {
    zm = k0 * tf.emitterPositionNm
    zp = dk[e]! - zm
    const same = (a: number, b: number) => er[a] === er[b] && ei[a] === ei[b]
    // Walk outward across boundaries that change nothing; reaching an outer medium means no step on that side.
    let down = zm, j = e
    while (j > 0 && same(j, j - 1)) { j--; down += dk[j]! }
    if (j === 0) down = Infinity
    let up = zp
    j = e
    while (j < M - 1 && same(j, j + 1)) { j++; up += dk[j]! }
    if (j === M - 1) up = Infinity
    zNear = Math.min(down, up)
  }
  return { wavelengthNm, M, er, ei, dk, e, ne, ng: glassIndex, zm, zp, zNear, w: new Float64Array(2 * M), y: new Float64Array(2 * M) }
}

/** Fill w_j for the in-plane effective index κ. */
export function setKappa(P: PreparedStack, kappa: number): void {
  const k2 = kappa * kappa
  for (let j = 0; j < P.M; j++) csqrtUpper(P.w, 2 * j, P.er[j]! - k2, P.ei[j]!)
}

/** Admittances for the polarisation: s → Y = w, p → Y = w/ε. Call after setKappa. */
export function setAdmittance(P: PreparedStack, p: boolean): void {
  const { w, y, er, ei } = P
  for (let j = 0; j < P.M; j++) {
    const wr = w[2 * j]!, wi = w[2 * j + 1]!
    if (!p) { y[2 * j] = wr; y[2 * j + 1] = wi; continue }
    const a = er[j]!, b = ei[j]!
    const d = a * a + b * b
    y[2 * j] = (wr * a + wi * b) / d
    y[2 * j + 1] = (wi * a - wr * b) / d
  }
}

const ph = new Float64Array(2)

/**
 * Airy recursion from the outer medium `from` towards medium `to` (from = 0 walks up, from = M−1 walks down). On
 * return o[k..k+3] = (R, T) seen from inside medium `to` at its boundary facing `from`: R the amplitude reflection
 * of everything beyond, T the amplitude that reaches the outer medium per unit amplitude leaving `to`. When `mark`
 * lies on the way, o[k+4..k+7] receives (R, T) at that medium too.
 */
export function airy(P: PreparedStack, from: number, to: number, o: Float64Array, k: number, mark = -1): void {
  const { y, w, dk } = P
  const step = from < to ? 1 : -1
  let Rr = 0, Ri = 0, Tr = 1, Ti = 0
  for (let i = from + step; step > 0 ? i <= to : i >= to; i += step) {
    const b = i - step // the medium already reduced (between i and the outer medium)
    const yir = y[2 * i]!, yii = y[2 * i + 1]!, ybr = y[2 * b]!, ybi = y[2 * b + 1]!
    const sr = yir + ybr, si = yii + ybi
    const s2 = sr * sr + si * si
    // r = (Yi − Yb)/(Yi + Yb), t = 2Yi/(Yi + Yb)
    const nr = yir - ybr, ni = yii - ybi
    const rr = (nr * sr + ni * si) / s2, ri = (ni * sr - nr * si) / s2
    const tr = (2 * (yir * sr + yii * si)) / s2, ti = (2 * (yii * sr - yir * si)) / s2
    // phase through medium b (zero thickness for the outer medium)
    cexpi(ph, 0, w[2 * b]! * dk[b]!, w[2 * b + 1]! * dk[b]!)
    const p1r = ph[0]!, p1i = ph[1]!
    const p2r = p1r * p1r - p1i * p1i, p2i = 2 * p1r * p1i
    const xr = Rr * p2r - Ri * p2i, xi = Rr * p2i + Ri * p2r
    const numr = rr + xr, numi = ri + xi
    const der = 1 + rr * xr - ri * xi, dei = rr * xi + ri * xr
    const dd = der * der + dei * dei
    Rr = (numr * der + numi * dei) / dd
    Ri = (numi * der - numr * dei) / dd
    const ar = tr * Tr - ti * Ti, ai = tr * Ti + ti * Tr
    const br = ar * p1r - ai * p1i, bi = ar * p1i + ai * p1r
    Tr = (br * der + bi * dei) / dd
    Ti = (bi * der - br * dei) / dd
    if (i === mark) { o[k + 4] = Rr; o[k + 5] = Ri; o[k + 6] = Tr; o[k + 7] = Ti }
  }
  o[k] = Rr; o[k + 1] = Ri; o[k + 2] = Tr; o[k + 3] = Ti
}

const scratch = new Float64Array(8)

/**
 * Power reflectance of the whole stack (all layers to the cathode) for a plane wave in the glass at angle
 * thetaGlassRad from the normal: { rs, rp }.
 */
export function stackReflectance(P: PreparedStack, thetaGlassRad: number): { rs: number; rp: number } {
  setKappa(P, P.ng * Math.sin(thetaGlassRad))
  setAdmittance(P, false)
  airy(P, P.M - 1, 0, scratch, 0)
  const rs = scratch[0]! ** 2 + scratch[1]! ** 2
  setAdmittance(P, true)
  airy(P, P.M - 1, 0, scratch, 0)
  const rp = scratch[0]! ** 2 + scratch[1]! ** 2
  return { rs, rp }
}
