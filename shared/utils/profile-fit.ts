// Fitting a stylus trace of one lens cap (rows [r_um, height_um], r from the centre outwards) into a profile the
// measured cap can trace: falling from the centre to the rim, no rise. Pure: the upload panel previews with it and
// the upload route stores the same fit. Units: µm in, µm out; residuals are reported in nm.
//
// Two fits:
// - "isotonic": symmetric (centred, equal-weight) moving-average smoothing of the heights, then the least-squares
//   non-increasing fit by pool-adjacent-violators (Ayer, Brunk, Ewing, Reid & Silverman, Ann. Math. Stat. 26, 641
//   (1955); Barlow, Bartholomew, Bremner & Brunk, "Statistical Inference under Order Restrictions", Wiley 1972).
// - "asphere": least squares of the even asphere height z(r) = z0 − [c r²/(1 + √(1 − (1+k)c²r²)) + Σ A_2j r^2j]
//   (j = 2 … 1+terms) by Levenberg–Marquardt, fitted in the normalised radius u = r/r_rim so that the unknowns are
//   of one size: q = c·r_rim and B_2j = A_2j·r_rim^2j (µm).
// The raw trace is kept by the caller; a fit is refused only when the result cannot be a cap (see fitProblems).

export type ProfileFitMethod = 'isotonic' | 'asphere'

export interface ProfileFitOptions {
  method: ProfileFitMethod
  /** isotonic: smoothing window in points (odd, 1 = none). Default 5. */
  smoothPoints?: number
  /** asphere: number of even terms beyond the conic (0 = conic only, at most 3: r⁴, r⁶, r⁸). Default 0. */
  asphereTerms?: number
}

export interface AsphereParams {
  /** Height at the centre (µm). */
  z0Um: number
  /** Vertex curvature (1/µm) and radius of curvature (µm). */
  curvaturePerUm: number
  radiusUm: number
  conicConstant: number
  /** A4, A6, A8 in µm^(1−2j). */
  asphereCoefficients: number[]
}

export interface ProfileFit {
  method: ProfileFitMethod
  /** The fitted profile at the trace's radii: [[r_um, height_um], ...]. */
  rows: number[][]
  /** RMS and largest |raw − fitted| over the trace (nm), and the 1-based row index of the largest. */
  rmsResidualNm: number
  maxResidualNm: number
  maxResidualRow: number
  smoothPoints?: number
  params?: AsphereParams
}

/** Least-squares non-increasing fit of y (weights w, default 1) by pool-adjacent-violators. */
export function isotonicNonIncreasing(y: readonly number[], w?: readonly number[]): number[] {
  const n = y.length
  const mean: number[] = [], weight: number[] = [], count: number[] = []
  for (let i = 0; i < n; i++) {
    mean.push(y[i]!); weight.push(w ? w[i]! : 1); count.push(1)
    // A block higher than the one before it violates the order: pool the two (weighted mean), repeat leftwards.
    while (mean.length > 1 && mean[mean.length - 1]! > mean[mean.length - 2]!) {
      const m2 = mean.pop()!, w2 = weight.pop()!, c2 = count.pop()!
      const m1 = mean.pop()!, w1 = weight.pop()!, c1 = count.pop()!
      mean.push((m1 * w1 + m2 * w2) / (w1 + w2)); weight.push(w1 + w2); count.push(c1 + c2)
    }
  }
  const out: number[] = []
  for (let b = 0; b < mean.length; b++) for (let j = 0; j < count[b]!; j++) out.push(mean[b]!)
  return out
}

/** Centred moving average over `points` (odd) values; the window narrows symmetrically at both ends. */
export function symmetricSmooth(y: readonly number[], points: number): number[] {
  const half = Math.max(0, Math.floor(points / 2))
  const n = y.length
  const out: number[] = []
  for (let i = 0; i < n; i++) {
    const h = Math.min(half, i, n - 1 - i)
    let s = 0
    for (let j = i - h; j <= i + h; j++) s += y[j]!
    out.push(s / (2 * h + 1))
  }
  return out
}

/** Even-asphere height at r (µm), or NaN where the conic is not defined (1 − (1+k)c²r² < 0). */
export function asphereHeightUm(p: AsphereParams, rUm: number): number {
  const c = p.curvaturePerUm, k = p.conicConstant
  const arg = 1 - (1 + k) * c * c * rUm * rUm
  if (arg < 0) return Number.NaN
  let sag = (c * rUm * rUm) / (1 + Math.sqrt(arg))
  let r2j = rUm * rUm
  for (const a of p.asphereCoefficients) { r2j *= rUm * rUm; sag += a * r2j }
  return p.z0Um - sag
}

function residualStats(raw: readonly number[], fit: readonly number[]) {
  let ss = 0, max = 0, at = 0
  for (let i = 0; i < raw.length; i++) {
    const d = Math.abs(raw[i]! - fit[i]!)
    ss += d * d
    if (d > max) { max = d; at = i }
  }
  return { rmsResidualNm: Math.sqrt(ss / raw.length) * 1000, maxResidualNm: max * 1000, maxResidualRow: at + 1 }
}

/** Solves the small dense system A x = b (Gaussian elimination, partial pivoting); null when singular. */
function solve(A: number[][], b: number[]): number[] | null {
  const n = b.length
  const M = A.map((row, i) => [...row, b[i]!])
  for (let col = 0; col < n; col++) {
    let piv = col
    for (let r = col + 1; r < n; r++) if (Math.abs(M[r]![col]!) > Math.abs(M[piv]![col]!)) piv = r
    if (!(Math.abs(M[piv]![col]!) > 0)) return null
    ;[M[col], M[piv]] = [M[piv]!, M[col]!]
    for (let r = col + 1; r < n; r++) {
      const f = M[r]![col]! / M[col]![col]!
      for (let c = col; c <= n; c++) M[r]![c]! -= f * M[col]![c]!
    }
  }
  const x = new Array<number>(n).fill(0)
  for (let r = n - 1; r >= 0; r--) {
    let s = M[r]![n]!
    for (let c = r + 1; c < n; c++) s -= M[r]![c]! * x[c]!
    x[r] = s / M[r]![r]!
  }
  return x
}

/**
 * Levenberg–Marquardt fit of the even asphere (header). Unknowns x = [z0, q, k, B4, …]; model in u = r/a:
 * z = z0 − a·q·u²/(1 + S) − Σ B_2j u^2j with S = √(1 − (1+k)q²u²).
 */
export function fitAsphere(rUm: readonly number[], zUm: readonly number[], terms = 0): AsphereParams {
  const a = rUm[rUm.length - 1]!
  const u = rUm.map((r) => r / a)
  const np = 3 + terms
  // Start: z ≈ z0 − A u² (linear least squares), q from the paraboloid's vertex curvature A = a·q/2, k = 0; q is
  // kept below 1 so that the sphere is defined out to the rim.
  const s = solve(
    [[u.length, -u.reduce((t, v) => t + v * v, 0)], [-u.reduce((t, v) => t + v * v, 0), u.reduce((t, v) => t + v ** 4, 0)]],
    [zUm.reduce((t, v) => t + v, 0), -zUm.reduce((t, v, i) => t + v * u[i]! ** 2, 0)],
  ) ?? [zUm[0]!, zUm[0]! - zUm[zUm.length - 1]!]
  let x = [s[0]!, Math.min(0.95, Math.max(1e-6, (2 * s[1]!) / a)), 0, ...new Array<number>(terms).fill(0)]

  const model = (p: number[], i: number, J?: number[]): number => {
    const ui = u[i]!, u2 = ui * ui, q = p[1]!, k = p[2]!
    const arg = 1 - (1 + k) * q * q * u2
    if (arg < 0) return Number.NaN
    const S = Math.sqrt(arg), den = 1 + S
    let z = p[0]! - (a * q * u2) / den
    let u2j = u2
    for (let j = 0; j < terms; j++) { u2j *= u2; z -= p[3 + j]! * u2j }
    if (J) {
      // d/dq and d/dk of a·q·u²/(1+S), with dS/dq = −(1+k)q u²/S and dS/dk = −q²u²/(2S) (S > 0 inside the rim).
      const Ss = Math.max(S, 1e-300)
      const dSdq = (-(1 + k) * q * u2) / Ss, dSdk = (-q * q * u2) / (2 * Ss)
      J[0] = 1
      J[1] = -((a * u2) / den - (a * q * u2 * dSdq) / (den * den))
      J[2] = (a * q * u2 * dSdk) / (den * den)
      let v = u2
      for (let j = 0; j < terms; j++) { v *= u2; J[3 + j] = -v }
    }
    return z
  }
  const cost = (p: number[]) => {
    let c = 0
    for (let i = 0; i < u.length; i++) { const d = zUm[i]! - model(p, i); c += d * d }
    return Number.isFinite(c) ? c : Infinity
  }

  let lambda = 1e-3
  let c0 = cost(x)
  const J = new Array<number>(np)
  for (let iter = 0; iter < 500; iter++) {
    const JTJ = Array.from({ length: np }, () => new Array<number>(np).fill(0))
    const JTr = new Array<number>(np).fill(0)
    for (let i = 0; i < u.length; i++) {
      const r = zUm[i]! - model(x, i, J)
      for (let p = 0; p < np; p++) {
        JTr[p]! += J[p]! * r
        for (let q = 0; q < np; q++) JTJ[p]![q]! += J[p]! * J[q]!
      }
    }
    let improved = false
    for (let tries = 0; tries < 30 && !improved; tries++) {
      const A = JTJ.map((row, p) => row.map((v, q) => (p === q ? v * (1 + lambda) + 1e-300 : v)))
      const dx = solve(A, JTr)
      if (!dx) { lambda *= 10; continue }
      const xn = x.map((v, p) => v + dx[p]!)
      const cn = cost(xn)
      if (cn < c0) {
        const rel = (c0 - cn) / Math.max(c0, 1e-300)
        x = xn; c0 = cn; lambda = Math.max(lambda / 10, 1e-15); improved = true
        // Converged: the sum of squares no longer falls by a meaningful fraction, or it is at rounding level.
        if (rel < 1e-15 || c0 < 1e-30 * u.length) iter = 1e9
      } else lambda *= 10
    }
    if (!improved) break
  }
  return {
    z0Um: x[0]!, curvaturePerUm: x[1]! / a, radiusUm: a / x[1]!, conicConstant: x[2]!,
    asphereCoefficients: x.slice(3).map((b, j) => b / a ** (4 + 2 * j)),
  }
}

/** The minimum points a fit needs. */
export function minFitPoints(opts: ProfileFitOptions): number {
  return opts.method === 'asphere' ? 3 + (opts.asphereTerms ?? 0) + 2 : 5
}

/** Fits the trace rows [[r_um, height_um], ...] (r increasing from 0). Call fitProblems on the result. */
export function fitProfile(rows: readonly number[][], opts: ProfileFitOptions): ProfileFit {
  const r = rows.map((row) => row[0]!), z = rows.map((row) => row[1]!)
  if (opts.method === 'isotonic') {
    const points = Math.max(1, Math.floor(opts.smoothPoints ?? 5)) | 1
    const fitted = isotonicNonIncreasing(symmetricSmooth(z, points))
    return { method: 'isotonic', smoothPoints: points, rows: r.map((v, i) => [v, fitted[i]!]), ...residualStats(z, fitted) }
  }
  const params = fitAsphere(r, z, Math.max(0, Math.min(3, Math.floor(opts.asphereTerms ?? 0))))
  const fitted = r.map((v) => asphereHeightUm(params, v))
  return { method: 'asphere', params, rows: r.map((v, i) => [v, fitted[i]!]), ...residualStats(z, fitted) }
}

/** Largest departure of the raw trace from a fitted cap still taken for noise, as a share of the sag (Lensfield's
 * own threshold: profilometer noise is nanometres on caps of 0.5–10 µm; a dimple or a second bump is far above). */
export const NOISE_SHARE_OF_SAG = 0.02

/** Why a fit cannot be a cap, naming the file line (lineOf[i] is the line of row i); empty when it can. */
export function fitProblems(fit: ProfileFit, lineOf: readonly number[]): string[] {
  const rows = fit.rows
  const n = rows.length
  const problems: string[] = []
  const bad = rows.findIndex((row) => !Number.isFinite(row[1]!))
  if (bad >= 0) return [`line ${lineOf[bad]}: the fitted conic is not defined this far from the centre (r_um = ${rows[bad]![0]}); use the isotonic fit`]
  const sagUm = rows[0]![1]! - rows[n - 1]![1]!
  if (!(sagUm > 0)) return ['after fitting, the centre is not higher than the rim: this trace is not a lens cap']
  // Rounding of a well-fitted flat top may leave rises of ~1e-12 µm; anything above 1e-9·sag is a real rise.
  for (let i = 1; i < n; i++) {
    if (rows[i]![1]! - rows[i - 1]![1]! > 1e-9 * sagUm) {
      problems.push(`line ${lineOf[i]}: the fitted profile rises towards the rim at r_um = ${rows[i]![0]}, so it is not a cap; try the isotonic fit`)
      break
    }
  }
  const neg = rows.findIndex((row) => row[1]! < 0)
  if (neg >= 0) problems.push(`line ${lineOf[neg]}: the fitted height is below the land (${(rows[neg]![1]! * 1000).toFixed(1)} nm) at r_um = ${rows[neg]![0]}`)
  if (fit.maxResidualNm > NOISE_SHARE_OF_SAG * sagUm * 1000) {
    problems.push(`line ${lineOf[fit.maxResidualRow - 1]}: the trace departs from the fitted cap by ${fit.maxResidualNm.toFixed(1)} nm, more than ${NOISE_SHARE_OF_SAG * 100} % of the sag (${(NOISE_SHARE_OF_SAG * sagUm * 1000).toFixed(1)} nm): that is a shape, not noise, and cannot be one cap`)
  }
  return problems
}
