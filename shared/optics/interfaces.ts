// Interfaces between homogeneous media: Snell's law, total internal reflection and the Fresnel power
// coefficients (Hecht, Optics, ch. 4; Born & Wolf, Principles of Optics, §1.5). Angles in radians; cosI is the
// cosine of the angle between the ray and the normal on the incidence side (0 < cosI ≤ 1). The tracer inlines the
// same formulas; these functions are the tested reference.

/** cos of the refraction angle, or −1 for total internal reflection. */
export function cosTransmitted(cosI: number, n1: number, n2: number): number {
  const eta = n1 / n2
  const sin2T = eta * eta * (1 - cosI * cosI)
  return sin2T >= 1 ? -1 : Math.sqrt(1 - sin2T)
}

/** s-polarised power reflectance (1 under TIR). */
export function fresnelRs(cosI: number, n1: number, n2: number): number {
  const cosT = cosTransmitted(cosI, n1, n2)
  if (cosT < 0) return 1
  const r = (n1 * cosI - n2 * cosT) / (n1 * cosI + n2 * cosT)
  return r * r
}

/** p-polarised power reflectance (1 under TIR). */
export function fresnelRp(cosI: number, n1: number, n2: number): number {
  const cosT = cosTransmitted(cosI, n1, n2)
  if (cosT < 0) return 1
  const r = (n2 * cosI - n1 * cosT) / (n2 * cosI + n1 * cosT)
  return r * r
}

/** Polarisation-averaged power reflectance (Rs + Rp)/2 — the reference ("averaged") mode. */
export function fresnelAveraged(cosI: number, n1: number, n2: number): number {
  const cosT = cosTransmitted(cosI, n1, n2)
  if (cosT < 0) return 1
  return fresnelAveragedWithCosT(cosI, cosT, n1, n2)
}

/** As fresnelAveraged when cosT is already known (cosT ≥ 0). */
export function fresnelAveragedWithCosT(cosI: number, cosT: number, n1: number, n2: number): number {
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const rs = (a - b) / (a + b)
  const rp = (c - d) / (c + d)
  return 0.5 * (rs * rs + rp * rp)
}

/** Critical angle asin(n2/n1) in radians, NaN when n2 ≥ n1 (no TIR). */
export function criticalAngleRad(n1: number, n2: number): number {
  return n2 < n1 ? Math.asin(n2 / n1) : NaN
}

/** Brewster angle atan(n2/n1) in radians (Rp = 0 there). */
export function brewsterAngleRad(n1: number, n2: number): number {
  return Math.atan(n2 / n1)
}

/** Fraction of an isotropic emitter (with an ideal mirror behind it) inside the escape cone: 1 − cos θc. */
export function escapeConeFraction(nInside: number, nOutside = 1): number {
  const s = nOutside / nInside
  return s >= 1 ? 1 : 1 - Math.sqrt(1 - s * s)
}
