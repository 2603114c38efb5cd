// Crossing an interface between homogeneous media: Snell's law, total internal reflection and the Fresnel
// power coefficients (Hecht, Optics, ch. 4; Born & Wolf, Principles of Optics, §1.5). The only home of this
// arithmetic: the readable model (steps.ts) calls the crossings, the fused loop (tracer.ts) calls fresnelReflects
// and repeats the crossings' vector algebra operation for operation (tests/unit/optics/model-equality.test.ts
// proves it), and the closed forms at the end are the tested reference the UI and tests use (interfaces.ts
// re-exports them). Fresnel mode "averaged" reflects with probability (Rs + Rp)/2, one uniform per decision.
// Angles in radians; cosI is the cosine between the ray and the normal on the incidence side (0 < cosI ≤ 1).
import { draw, type Ray } from './ray'

/** Outcomes of a crossing. */
export const CROSS_TRANSMIT = 0
export const CROSS_REFLECT = 1 // Fresnel reflection (the ray is reflected)
export const CROSS_TIR = 2 // total internal reflection (the ray is left unchanged: the caller decides)

/**
 * Fresnel decision: reflect when u < (Rs + Rp)/2 for amplitude coefficients rs = (n1 cosI − n2 cosT)/(n1 cosI + n2
 * cosT), rp = (n2 cosI − n1 cosT)/(n2 cosI + n1 cosT). Returns a boolean, not R: V8 boxes a double returned from a
 * call it did not inline, and the fused loop's inlining budget is spent long before its last call site.
 */
export function fresnelReflects(u: number, cosI: number, cosT: number, n1: number, n2: number): boolean {
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const rs = (a - b) / (a + b)
  const rp = (c - d) / (c + d)
  return u < 0.5 * (rs * rs + rp * rp)
}

/**
 * A flat face (normal ±z) from index n1 to n2, met going up (`up`, cosI = dz) or down (cosI = −dz). TIR: returns CROSS_TIR, ray unchanged. With `fresnel`
 * a uniform is drawn and the ray may be reflected (dz → −dz, CROSS_REFLECT). Transmission scales the lateral
 * direction by η = n1/n2 and sets |dz| = cosT, keeping the sense of travel (CROSS_TRANSMIT).
 */
export function flatCrossing(ray: Ray, up: boolean, n1: number, n2: number, fresnel: boolean): number {
  const cosI = up ? ray.dz : -ray.dz
  const eta = n1 / n2
  const sin2T = eta * eta * (1 - cosI * cosI)
  if (sin2T >= 1) return CROSS_TIR
  const cosT = Math.sqrt(1 - sin2T)
  if (fresnel && fresnelReflects(draw(ray), cosI, cosT, n1, n2)) { ray.dz = -ray.dz; return CROSS_REFLECT }
  ray.dx *= eta; ray.dy *= eta; ray.dz = up ? cosT : -cosT
  return CROSS_TRANSMIT
}

/**
 * A curved surface with unit normal (nx, ny, nz) pointing into the far medium (n2), cosI = d·n > 0. TIR or a
 * Fresnel reflection (one uniform drawn when `fresnel` and no TIR) mirrors the ray, d − 2(d·n)n, and returns
 * CROSS_TIR or CROSS_REFLECT; transmission refracts it, d' = η d + (cosT − η cosI) n with η = n1/n2 (vector Snell's
 * law), and returns CROSS_TRANSMIT.
 */
export function curvedCrossing(ray: Ray, nx: number, ny: number, nz: number, n1: number, n2: number, fresnel: boolean): number {
  const cosI = ray.dx * nx + ray.dy * ny + ray.dz * nz
  const eta = n1 / n2
  const sin2T = eta * eta * (1 - cosI * cosI)
  const tir = sin2T >= 1
  if (tir || (fresnel && fresnelReflects(draw(ray), cosI, Math.sqrt(1 - sin2T), n1, n2))) {
    ray.dx -= 2 * cosI * nx; ray.dy -= 2 * cosI * ny; ray.dz -= 2 * cosI * nz
    return tir ? CROSS_TIR : CROSS_REFLECT
  }
  const cosT = Math.sqrt(1 - sin2T)
  const g = cosT - eta * cosI
  ray.dx = eta * ray.dx + g * nx; ray.dy = eta * ray.dy + g * ny; ray.dz = eta * ray.dz + g * nz
  return CROSS_TRANSMIT
}

// Closed forms (reference values for tests and the UI)

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
