// Complex arithmetic for the thin-film core without allocation: every operation writes its result into a caller's
// Float64Array at an even slot (re at k, im at k + 1). Used per (wavelength × in-plane wavevector) sample, not per ray.
// The square root takes the branch with Im ≥ 0, so exp(i·k_z·z) never grows with z (evanescent waves decay and
// absorbing media attenuate), as plane-wave expansions of dipole fields require (Chance, Prock & Silbey 1978).

/** o[k] + i·o[k+1] = (ar + i·ai)(br + i·bi). Safe when o aliases an input only if read into locals first. */
export function cmul(o: Float64Array, k: number, ar: number, ai: number, br: number, bi: number): void {
  const re = ar * br - ai * bi
  const im = ar * bi + ai * br
  o[k] = re
  o[k + 1] = im
}

/** Quotient by Smith's algorithm (no overflow for |b| large, as for a metal of huge |ε|). */
export function cdiv(o: Float64Array, k: number, ar: number, ai: number, br: number, bi: number): void {
  if (Math.abs(br) >= Math.abs(bi)) {
    const r = bi / br
    const d = br + bi * r
    o[k] = (ar + ai * r) / d
    o[k + 1] = (ai - ar * r) / d
  } else {
    const r = br / bi
    const d = br * r + bi
    o[k] = (ar * r + ai) / d
    o[k + 1] = (ai * r - ar) / d
  }
}

/** Square root on the branch Im ≥ 0 (Re ≥ 0 when the result is real). */
export function csqrtUpper(o: Float64Array, k: number, re: number, im: number): void {
  const m = Math.hypot(re, im)
  let sr = Math.sqrt(Math.max(0, (m + re) / 2))
  let si = Math.sqrt(Math.max(0, (m - re) / 2))
  if (im < 0) si = -si
  // Principal root has Re ≥ 0; flip to the upper half plane when it fell below (only for im < 0, i.e. gain media).
  if (si < 0) { sr = -sr; si = -si }
  o[k] = sr
  o[k + 1] = si
}

/** exp(i·z) for z = re + i·im. */
export function cexpi(o: Float64Array, k: number, re: number, im: number): void {
  const a = Math.exp(-im)
  o[k] = a * Math.cos(re)
  o[k + 1] = a * Math.sin(re)
}

export function cabs2(re: number, im: number): number {
  return re * re + im * im
}
