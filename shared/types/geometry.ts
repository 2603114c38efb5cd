// Derived lens geometry, so a form can take any two of diameter / sag / radius of curvature, and fill factor
// instead of diameter. Pure functions, lengths in µm, angles in degrees (UI edge) unless the name says Rad.
//
// Spherical cap of base diameter D (r = D/2) and sag h: Rc = (r² + h²)/(2h), h = Rc − √(Rc² − r²), contact angle
// 2·atan(h/r). Fill factor of circular bases with D ≤ p: hexagonal π/(2√3)·(D/p)², square π/4·(D/p)².
// Conic cap z_sag(ρ) = cρ²/(1 + √(1 − (1+k)c²ρ²)); requiring sag(a) = h, a = D/2, gives (from the implicit form
// cρ² − 2s + (1+k)c·s² = 0 at ρ = a, s = h) c = 2h/(a² + (1+k)h²); the cap lies on the lower branch iff (1+k)h² ≤ a²
// (k > −1), and c stays finite iff a² + (1+k)h² > 0, i.e. h < a/√(−1−k) for a hyperboloid (k < −1).

export type LatticeKind = 'hexagonal' | 'square'

/** Radius of curvature of a spherical cap of base diameter D and sag h (0 < h ≤ D/2). */
export function radiusOfCurvatureUm(diameterUm: number, sagUm: number): number {
  const r = diameterUm / 2
  return (r * r + sagUm * sagUm) / (2 * sagUm)
}

/** Sag of a spherical cap of base diameter D cut from a sphere of radius Rc ≥ D/2 (the smaller cap). */
export function sagFromRadiusUm(diameterUm: number, radiusOfCurvatureUm: number): number {
  const r = diameterUm / 2
  // a relative 1e-12 below r is rounding of a hemisphere's Rc = r, not a smaller sphere
  if (radiusOfCurvatureUm < r * (1 - 1e-12)) return NaN
  // r²/(Rc + √(Rc² − r²)) equals Rc − √(Rc² − r²) without cancellation for flat caps.
  return (r * r) / (radiusOfCurvatureUm + Math.sqrt(Math.max(0, radiusOfCurvatureUm * radiusOfCurvatureUm - r * r)))
}

/** Base diameter of a spherical cap of radius Rc and sag h (h ≤ Rc). */
export function diameterFromRadiusAndSagUm(radiusOfCurvatureUm: number, sagUm: number): number {
  return 2 * Math.sqrt(Math.max(0, sagUm * (2 * radiusOfCurvatureUm - sagUm)))
}

/** Contact angle between the cap and the flat face at the rim, 2·atan(h/r), in degrees (hemisphere → 90°). */
export function contactAngleDeg(diameterUm: number, sagUm: number): number {
  return (2 * Math.atan(sagUm / (diameterUm / 2)) * 180) / Math.PI
}

/** Packing constant: hexagonal π/(2√3) ≈ 0.9069, square π/4. */
export function packingConstant(lattice: LatticeKind): number {
  return lattice === 'hexagonal' ? Math.PI / (2 * Math.sqrt(3)) : Math.PI / 4
}

/** Area fraction covered by circular lens bases (D ≤ pitch). */
export function fillFactor(lattice: LatticeKind, diameterUm: number, pitchUm: number): number {
  const q = diameterUm / pitchUm
  return packingConstant(lattice) * q * q
}

/** Base diameter giving a fill factor at a pitch (inverse of fillFactor). */
export function diameterFromFillFactorUm(lattice: LatticeKind, fill: number, pitchUm: number): number {
  return pitchUm * Math.sqrt(fill / packingConstant(lattice))
}

/** Largest fill factor (caps touching, D = p). */
export function maxFillFactor(lattice: LatticeKind): number {
  return packingConstant(lattice)
}

/** Area of one lattice cell in µm²: hexagonal p²·√3/2, square p². */
export function cellAreaUm2(lattice: LatticeKind, pitchUm: number): number {
  return lattice === 'hexagonal' ? (pitchUm * pitchUm * Math.sqrt(3)) / 2 : pitchUm * pitchUm
}

/** Vertex curvature (1/µm) of a conic cap with base diameter D, sag h and conic constant k: 2h/(a² + (1+k)h²). */
export function conicCurvaturePerUm(diameterUm: number, sagUm: number, conicConstant: number): number {
  const a = diameterUm / 2
  return (2 * sagUm) / (a * a + (1 + conicConstant) * sagUm * sagUm)
}

/** Sag below the vertex of a conic profile at radial distance ρ (µm). */
export function conicSagUm(rhoUm: number, curvaturePerUm: number, conicConstant: number): number {
  const c = curvaturePerUm
  return (c * rhoUm * rhoUm) / (1 + Math.sqrt(Math.max(0, 1 - (1 + conicConstant) * c * c * rhoUm * rhoUm)))
}

/** Conic constant of a named shape (spherical 0, parabolic −1). */
export function shapeConicConstant(shape: 'spherical' | 'parabolic' | 'conic', conicConstant?: number): number {
  return shape === 'spherical' ? 0 : shape === 'parabolic' ? -1 : (conicConstant ?? 0)
}

/** Largest sag (µm) a conic cap of base diameter D may have: a/√(1+k) for k > −1, a/√(−1−k) (exclusive) for k < −1, ∞ for k = −1. */
export function maxConicSagUm(diameterUm: number, conicConstant: number): number {
  const a = diameterUm / 2
  if (conicConstant > -1) return a / Math.sqrt(1 + conicConstant)
  if (conicConstant < -1) return a / Math.sqrt(-1 - conicConstant)
  return Infinity
}
