// Crossing an interface between homogeneous media: Snell's law, total internal reflection and the Fresnel
// power coefficients (Hecht, Optics, ch. 4; Born & Wolf, Principles of Optics, §1.5). The only home of this
// arithmetic: the readable model (steps.ts) calls the crossings, the fused loop (tracer.ts) calls fresnelReflects
// and repeats the crossings' vector algebra operation for operation (tests/unit/optics/model-equality.test.ts
// proves it), and the closed forms at the end are the tested reference the UI and tests use (interfaces.ts
// re-exports them). Fresnel mode "averaged" reflects with probability (Rs + Rp)/2, one uniform per decision;
// "polarized" (`polarized` argument) tracks the ray's field (ray.pol) and reflects with its own probability, also
// one uniform per decision.
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
 * A flat face (normal ±z) from index n1 to n2, met going up (`up`, cosI = dz) or down (cosI = −dz). TIR: returns
 * CROSS_TIR, direction unchanged (with `polarized` the field is already the totally reflected one: the caller
 * mirrors the ray or ends it). With `fresnel`
 * a uniform is drawn and the ray may be reflected (dz → −dz, CROSS_REFLECT). Transmission scales the lateral
 * direction by η = n1/n2 and sets |dz| = cosT, keeping the sense of travel (CROSS_TRANSMIT).
 */
export function flatCrossing(ray: Ray, up: boolean, n1: number, n2: number, fresnel: boolean, polarized = false): number {
  const cosI = up ? ray.dz : -ray.dz
  const eta = n1 / n2
  const sin2T = eta * eta * (1 - cosI * cosI)
  const nz = up ? 1 : -1
  if (sin2T >= 1) {
    if (polarized) polarizedTir(ray.pol, ray.dx, ray.dy, ray.dz, 0, 0, nz, cosI, sin2T, n1, n2)
    return CROSS_TIR
  }
  const cosT = Math.sqrt(1 - sin2T)
  if (fresnel && (polarized
    ? polarizedReflects(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz, 0, 0, nz, cosI, cosT, n1, n2)
    : fresnelReflects(draw(ray), cosI, cosT, n1, n2))) { ray.dz = -ray.dz; return CROSS_REFLECT }
  ray.dx *= eta; ray.dy *= eta; ray.dz = up ? cosT : -cosT
  return CROSS_TRANSMIT
}

/**
 * A curved surface with unit normal (nx, ny, nz) pointing into the far medium (n2), cosI = d·n > 0. TIR or a
 * Fresnel reflection (one uniform drawn when `fresnel` and no TIR) mirrors the ray, d − 2(d·n)n, and returns
 * CROSS_TIR or CROSS_REFLECT; transmission refracts it, d' = η d + (cosT − η cosI) n with η = n1/n2 (vector Snell's
 * law), and returns CROSS_TRANSMIT.
 */
export function curvedCrossing(ray: Ray, nx: number, ny: number, nz: number, n1: number, n2: number, fresnel: boolean, polarized = false): number {
  const cosI = ray.dx * nx + ray.dy * ny + ray.dz * nz
  const eta = n1 / n2
  const sin2T = eta * eta * (1 - cosI * cosI)
  const tir = sin2T >= 1
  if (tir
    ? (!polarized || polarizedTir(ray.pol, ray.dx, ray.dy, ray.dz, nx, ny, nz, cosI, sin2T, n1, n2))
    : (fresnel && (polarized
      ? polarizedReflects(ray.pol, draw(ray), ray.dx, ray.dy, ray.dz, nx, ny, nz, cosI, Math.sqrt(1 - sin2T), n1, n2)
      : fresnelReflects(draw(ray), cosI, Math.sqrt(1 - sin2T), n1, n2)))) {
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

// Polarisation-tracked Fresnel (mode "polarized"). The field is a complex unit 3-vector perpendicular to the
// ray (a 3-D Jones vector) held in a Float64Array(6): [xRe, xIm, yRe, yIm, zRe, zIm]. At an interface with unit
// normal n (into the far medium, cosI = k·n > 0): s = normalize(k × n) (any perpendicular when k ∥ n) and
// p = s × k for each wave (incident, reflected, transmitted); amplitude coefficients as in fresnelReflects plus
// ts = 2 n1 cosI/(n1 cosI + n2 cosT), tp = 2 n1 cosI/(n2 cosI + n1 cosT) (Hecht, Optics, ch. 4). With this
// convention rp = −rs at normal incidence, so a normally reflected field is rs times the incident one in the lab
// frame. Under TIR cosT = iκ, κ = √(sin²θT − 1): |rs| = |rp| = 1 and the phases are kept (the state turns
// elliptical). No allocation: scratch below; the fused loop calls these with scalars.

/** Scratch of the last projection: s (0–2), p of the incident wave (3–5), Es (6, 7), Ep (8, 9) as re/im. */
const pj = new Float64Array(10)

/** Fills pj for a field f on a ray k at a surface with normal n. */
function project(f: Float64Array, kx: number, ky: number, kz: number, nx: number, ny: number, nz: number): void {
  let sx = ky * nz - kz * ny, sy = kz * nx - kx * nz, sz = kx * ny - ky * nx
  let len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  if (len < 1e-12) {
    // k ∥ n: every transverse direction is an s direction; take z × k, or x × k when k is near z
    if (kz < 0.9 && kz > -0.9) { sx = -ky; sy = kx; sz = 0 } else { sx = 0; sy = -kz; sz = ky }
    len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  }
  const il = 1 / len
  sx *= il; sy *= il; sz *= il
  const px = sy * kz - sz * ky, py = sz * kx - sx * kz, pz = sx * ky - sy * kx
  pj[0] = sx; pj[1] = sy; pj[2] = sz; pj[3] = px; pj[4] = py; pj[5] = pz
  pj[6] = f[0]! * sx + f[2]! * sy + f[4]! * sz; pj[7] = f[1]! * sx + f[3]! * sy + f[5]! * sz
  pj[8] = f[0]! * px + f[2]! * py + f[4]! * pz; pj[9] = f[1]! * px + f[3]! * py + f[5]! * pz
}

/** Power reflectance |rs|²|Es|² + |rp|²|Ep|² of field f on ray k (no TIR; cosT ≥ 0). */
export function polarizedReflectance(f: Float64Array, kx: number, ky: number, kz: number, nx: number, ny: number, nz: number,
  cosI: number, cosT: number, n1: number, n2: number): number {
  project(f, kx, ky, kz, nx, ny, nz)
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const rs = (a - b) / (a + b), rp = (c - d) / (c + d)
  const es2 = pj[6]! * pj[6]! + pj[7]! * pj[7]!, ep2 = pj[8]! * pj[8]! + pj[9]! * pj[9]!
  return rs * rs * es2 + rp * rp * ep2
}

/**
 * Polarised Fresnel decision (no TIR): reflect when u < |rs|²|Es|² + |rp|²|Ep|²; f becomes the reflected field
 * rs·Es·s + rp·Ep·p_r or the transmitted one ts·Es·s + tp·Ep·p_t, renormalised. The caller moves the ray (the
 * same mirror d − 2(d·n)n or vector Snell's law the field was built for). Boolean return, as fresnelReflects.
 */
export function polarizedReflects(f: Float64Array, u: number, kx: number, ky: number, kz: number, nx: number, ny: number, nz: number,
  cosI: number, cosT: number, n1: number, n2: number): boolean {
  pin[0] = kx; pin[1] = ky; pin[2] = kz; pin[3] = nx; pin[4] = ny; pin[5] = nz
  pin[6] = cosI; pin[7] = cosT; pin[8] = n1; pin[9] = n2; pin[10] = u
  return polarizedReflectsIn(f)
}

/**
 * Inputs of the polarised crossings for callers that avoid passing doubles (V8 boxes a double argument of a call
 * it does not inline): [kx, ky, kz, nx, ny, nz, cosI, cosT (TIR: sin²θT), n1, n2, u].
 */
export const pin = new Float64Array(11)

/**
 * polarizedReflects with its inputs in pin. The projection (s, p, Es, Ep) and the composition of the outgoing
 * field are written out here rather than called (project/compose above do the same for polarizedReflectance): V8
 * declined to inline them into this function once it was itself inlined into the fused loop. The outgoing field's
 * norm √(|A|² + |B|²) is √R for the reflected wave (R, the decision's probability) and √(ts²|Es|² + tp²|Ep|²) for
 * the transmitted one.
 */
export function polarizedReflectsIn(f: Float64Array): boolean {
  const kx = pin[0]!, ky = pin[1]!, kz = pin[2]!, nx = pin[3]!, ny = pin[4]!, nz = pin[5]!
  const cosI = pin[6]!, cosT = pin[7]!, n1 = pin[8]!, n2 = pin[9]!
  // s = normalize(k × n), p = s × k (as project)
  let sx = ky * nz - kz * ny, sy = kz * nx - kx * nz, sz = kx * ny - ky * nx
  let len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  if (len < 1e-12) {
    if (kz < 0.9 && kz > -0.9) { sx = -ky; sy = kx; sz = 0 } else { sx = 0; sy = -kz; sz = ky }
    len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  }
  const il = 1 / len
  sx *= il; sy *= il; sz *= il
  let px = sy * kz - sz * ky, py = sz * kx - sx * kz, pz = sx * ky - sy * kx
  const f0 = f[0]!, f1 = f[1]!, f2 = f[2]!, f3 = f[3]!, f4 = f[4]!, f5 = f[5]!
  const esRe = f0 * sx + f2 * sy + f4 * sz, esIm = f1 * sx + f3 * sy + f5 * sz
  const epRe = f0 * px + f2 * py + f4 * pz, epIm = f1 * px + f3 * py + f5 * pz
  const a = n1 * cosI, b = n2 * cosT, c = n2 * cosI, d = n1 * cosT
  const es2 = esRe * esRe + esIm * esIm, ep2 = epRe * epRe + epIm * epIm
  let A: number, B: number, qx: number, qy: number, qz: number
  const rs = (a - b) / (a + b), rp = (c - d) / (c + d)
  const R = rs * rs * es2 + rp * rp * ep2
  const reflected = pin[10]! < R
  if (reflected) {
    const g = 2 * cosI
    qx = kx - g * nx; qy = ky - g * ny; qz = kz - g * nz
    const im = 1 / Math.sqrt(R)
    A = rs * im; B = rp * im
  } else {
    const ts = (2 * a) / (a + b), tp = (2 * a) / (c + d)
    const eta = n1 / n2, h = cosT - eta * cosI
    qx = eta * kx + h * nx; qy = eta * ky + h * ny; qz = eta * kz + h * nz
    const im = 1 / Math.sqrt(ts * ts * es2 + tp * tp * ep2)
    A = ts * im; B = tp * im
  }
  // f = A·Es·s + B·Ep·(s × q) (s ⊥ q, both unit: s × q is unit to rounding, no renormalisation of it needed)
  px = sy * qz - sz * qy; py = sz * qx - sx * qz; pz = sx * qy - sy * qx
  const aRe = A * esRe, aIm = A * esIm, bRe = B * epRe, bIm = B * epIm
  f[0] = aRe * sx + bRe * px; f[1] = aIm * sx + bIm * px
  f[2] = aRe * sy + bRe * py; f[3] = aIm * sy + bIm * py
  f[4] = aRe * sz + bRe * pz; f[5] = aIm * sz + bIm * pz
  return reflected
}

/**
 * Total internal reflection of field f (sin²θT = sin2T ≥ 1): rs = (a − ib)/(a + ib) with a = n1 cosI, b = n2 κ;
 * rp = (a′ − ib′)/(a′ + ib′) with a′ = n2 cosI, b′ = n1 κ. Returns true (the ray is reflected; the caller mirrors it).
 */
export function polarizedTir(f: Float64Array, kx: number, ky: number, kz: number, nx: number, ny: number, nz: number,
  cosI: number, sin2T: number, n1: number, n2: number): boolean {
  pin[0] = kx; pin[1] = ky; pin[2] = kz; pin[3] = nx; pin[4] = ny; pin[5] = nz
  pin[6] = cosI; pin[7] = sin2T; pin[8] = n1; pin[9] = n2
  return polarizedTirIn(f)
}

/** polarizedTir with its inputs in pin (pin[7] = sin²θT); projection and composition written out as in polarizedReflectsIn. */
export function polarizedTirIn(f: Float64Array): boolean {
  const kx = pin[0]!, ky = pin[1]!, kz = pin[2]!, nx = pin[3]!, ny = pin[4]!, nz = pin[5]!
  const cosI = pin[6]!, n1 = pin[8]!, n2 = pin[9]!
  let sx = ky * nz - kz * ny, sy = kz * nx - kx * nz, sz = kx * ny - ky * nx
  let len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  if (len < 1e-12) {
    if (kz < 0.9 && kz > -0.9) { sx = -ky; sy = kx; sz = 0 } else { sx = 0; sy = -kz; sz = ky }
    len = Math.sqrt(sx * sx + sy * sy + sz * sz)
  }
  const il = 1 / len
  sx *= il; sy *= il; sz *= il
  let px = sy * kz - sz * ky, py = sz * kx - sx * kz, pz = sx * ky - sy * kx
  const f0 = f[0]!, f1 = f[1]!, f2 = f[2]!, f3 = f[3]!, f4 = f[4]!, f5 = f[5]!
  const esRe = f0 * sx + f2 * sy + f4 * sz, esIm = f1 * sx + f3 * sy + f5 * sz
  const epRe = f0 * px + f2 * py + f4 * pz, epIm = f1 * px + f3 * py + f5 * pz
  const kap = Math.sqrt(pin[7]! - 1)
  const a = n1 * cosI, b = n2 * kap, c = n2 * cosI, d = n1 * kap
  const ms = a * a + b * b, mp = c * c + d * d
  const rsRe = (a * a - b * b) / ms, rsIm = (-2 * a * b) / ms
  const rpRe = (c * c - d * d) / mp, rpIm = (-2 * c * d) / mp
  let aRe = rsRe * esRe - rsIm * esIm, aIm = rsRe * esIm + rsIm * esRe
  let bRe = rpRe * epRe - rpIm * epIm, bIm = rpRe * epIm + rpIm * epRe
  const g = 2 * cosI
  const qx = kx - g * nx, qy = ky - g * ny, qz = kz - g * nz
  // |rs| = |rp| = 1: the norm is |Es|² + |Ep|² = 1 to rounding, renormalised so that rounding cannot accumulate
  const im = 1 / Math.sqrt(aRe * aRe + aIm * aIm + bRe * bRe + bIm * bIm)
  aRe *= im; aIm *= im; bRe *= im; bIm *= im
  px = sy * qz - sz * qy; py = sz * qx - sx * qz; pz = sx * qy - sy * qx
  f[0] = aRe * sx + bRe * px; f[1] = aIm * sx + bIm * px
  f[2] = aRe * sy + bRe * py; f[3] = aIm * sy + bIm * py
  f[4] = aRe * sz + bRe * pz; f[5] = aIm * sz + bIm * pz
  return true
}

/** The back reflector as an ideal metal, normal −z (rs = −1, rp = +1): f becomes the field after the mirror. */
export function metalReflect(f: Float64Array, kx: number, ky: number, kz: number): void {
  pin[0] = kx; pin[1] = ky; pin[2] = kz
  metalReflectIn(f)
}

/**
 * metalReflect with k in pin[0..2]. With s = normalize(k × n) horizontal for n = −z, p_r = s × k_r with
 * k_r = (kx, ky, −kz): −Es·s + Ep·p_r = (−Ex, −Ey, Ez) (the tangential field reverses, the normal one stays: the
 * perfect-conductor boundary condition), so no basis is needed; the norm is unchanged.
 */
export function metalReflectIn(f: Float64Array): void {
  f[0] = -f[0]!; f[1] = -f[1]!; f[2] = -f[2]!; f[3] = -f[3]!
}

function compose(f: Float64Array, aRe: number, aIm: number, bRe: number, bIm: number, qx: number, qy: number, qz: number): void {
  const sx = pj[0]!, sy = pj[1]!, sz = pj[2]!
  // s ⊥ q, both unit: p = s × q is unit to rounding (no renormalisation of p needed)
  const px = sy * qz - sz * qy, py = sz * qx - sx * qz, pz = sx * qy - sy * qx
  const im = 1 / Math.sqrt(aRe * aRe + aIm * aIm + bRe * bRe + bIm * bIm)
  aRe *= im; aIm *= im; bRe *= im; bIm *= im
  f[0] = aRe * sx + bRe * px; f[1] = aIm * sx + bIm * px
  f[2] = aRe * sy + bRe * py; f[3] = aIm * sy + bIm * py
  f[4] = aRe * sz + bRe * pz; f[5] = aIm * sz + bIm * pz
}

/**
 * An ideal metal face with unit normal n (pin[3..5], into the metal; the finite panel's mirrored edge): the field's
 * s part flips (rs = −1), p is kept (rp = +1), as metalReflectIn for the back reflector. k in pin[0..2], cosI = k·n
 * in pin[6]; the caller mirrors the ray, k − 2(k·n)n.
 */
export function metalReflectNormalIn(f: Float64Array): void {
  const kx = pin[0]!, ky = pin[1]!, kz = pin[2]!, nx = pin[3]!, ny = pin[4]!, nz = pin[5]!
  project(f, kx, ky, kz, nx, ny, nz)
  const g = 2 * pin[6]!
  compose(f, -pj[6]!, -pj[7]!, pj[8]!, pj[9]!, kx - g * nx, ky - g * ny, kz - g * nz)
}

/** A random linear polarisation for a ray along k: angle 2πu from the s direction of k against z (f real). */
export function randomPolarization(f: Float64Array, u: number, kx: number, ky: number, kz: number): void {
  pin[0] = kx; pin[1] = ky; pin[2] = kz; pin[10] = u
  randomPolarizationIn(f)
}

/**
 * The s and p directions of a ray k against z (s = normalize(k × z), p = s × k; as project with n = +z, where
 * k × z = (ky, −kx, 0)) into lb[0..5].
 */
const lb = new Float64Array(6)
function launchBasis(kx: number, ky: number, kz: number): void {
  let sx = ky, sy = -kx, sz = 0
  let len = Math.sqrt(sx * sx + sy * sy)
  if (len < 1e-12) {
    sx = 0; sy = -kz; sz = ky
    len = Math.sqrt(sy * sy + sz * sz)
  }
  const il = 1 / len
  sx *= il; sy *= il; sz *= il
  lb[0] = sx; lb[1] = sy; lb[2] = sz
  lb[3] = sy * kz - sz * ky; lb[4] = sz * kx - sx * kz; lb[5] = sx * ky - sy * kx
}

/** randomPolarization with k in pin[0..2] and u in pin[10]: f = cos ψ·s + sin ψ·p, real (unit to rounding). */
export function randomPolarizationIn(f: Float64Array): void {
  launchBasis(pin[0]!, pin[1]!, pin[2]!)
  const psi = 2 * Math.PI * pin[10]!
  const c = Math.cos(psi), sn = Math.sin(psi)
  f[0] = c * lb[0]! + sn * lb[3]!; f[1] = 0
  f[2] = c * lb[1]! + sn * lb[4]!; f[3] = 0
  f[4] = c * lb[2]! + sn * lb[5]!; f[5] = 0
}

/**
 * A linear polarisation for a ray along k leaving the thin-film stack: pure s (pin[10] = 0; along k × z) or pure p
 * (pin[10] = 1; s × k), the two eigenstates the stack emits into the glass.
 */
export function linearPolarizationIn(f: Float64Array): void {
  launchBasis(pin[0]!, pin[1]!, pin[2]!)
  const o = pin[10]! === 0 ? 0 : 3
  f[0] = lb[o]!; f[1] = 0; f[2] = lb[o + 1]!; f[3] = 0; f[4] = lb[o + 2]!; f[5] = 0
}

/**
 * The thin-film stack met from the glass (normal −z, into the stack), polarised: reflect when
 * u < |r_s|²|Es|² + |r_p|²|Ep|² with the stack's complex coefficients; f becomes r_s·Es·s + r_p·Ep·p_r
 * renormalised (the caller mirrors the ray), else the light is absorbed in the stack (false, f unchanged).
 * Inputs in pin: k (0–2), Re r_s, Im r_s, Re r_p, Im r_p (3–6), u (10).
 */
export function stackReflectsIn(f: Float64Array): boolean {
  const kx = pin[0]!, ky = pin[1]!, kz = pin[2]!
  const rsRe = pin[3]!, rsIm = pin[4]!, rpRe = pin[5]!, rpIm = pin[6]!
  // s = normalize(k × n) with n = −z: (−ky, kx, 0); p = s × k (as project)
  let sx = -ky, sy = kx, sz = 0
  let len = Math.sqrt(sx * sx + sy * sy)
  if (len < 1e-12) {
    sx = 0; sy = -kz; sz = ky
    len = Math.sqrt(sy * sy + sz * sz)
  }
  const il = 1 / len
  sx *= il; sy *= il; sz *= il
  let px = sy * kz - sz * ky, py = sz * kx - sx * kz, pz = sx * ky - sy * kx
  const f0 = f[0]!, f1 = f[1]!, f2 = f[2]!, f3 = f[3]!, f4 = f[4]!, f5 = f[5]!
  const esRe = f0 * sx + f2 * sy + f4 * sz, esIm = f1 * sx + f3 * sy + f5 * sz
  const epRe = f0 * px + f2 * py + f4 * pz, epIm = f1 * px + f3 * py + f5 * pz
  const R = (rsRe * rsRe + rsIm * rsIm) * (esRe * esRe + esIm * esIm) + (rpRe * rpRe + rpIm * rpIm) * (epRe * epRe + epIm * epIm)
  if (!(pin[10]! < R)) return false
  // f = r_s·Es·s + r_p·Ep·(s × k_r), k_r = (kx, ky, −kz), over its norm √R
  const im = 1 / Math.sqrt(R)
  const aRe = (rsRe * esRe - rsIm * esIm) * im, aIm = (rsRe * esIm + rsIm * esRe) * im
  const bRe = (rpRe * epRe - rpIm * epIm) * im, bIm = (rpRe * epIm + rpIm * epRe) * im
  px = -sy * kz - sz * ky; py = sz * kx + sx * kz; pz = sx * ky - sy * kx
  f[0] = aRe * sx + bRe * px; f[1] = aIm * sx + bIm * px
  f[2] = aRe * sy + bRe * py; f[3] = aIm * sy + bIm * py
  f[4] = aRe * sz + bRe * pz; f[5] = aIm * sz + bIm * pz
  return true
}
