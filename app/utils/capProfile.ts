// Depth below the vertex s(ρ) of one cap as the tracer models it, for the drawings (2-D cut, 3-D patch): conic
// caps through conicSagUm with the vertex curvature of shared/types/geometry.ts, measured caps through the same
// monotone interpolant the engine builds (shared/optics/profile.ts), scaled to D/2 radially and h in height.
import { conicCurvaturePerUm, conicSagUm, shapeConicConstant } from '#shared/types/geometry'
import { buildProfile, measuredSagUm } from '#shared/optics/profile'

export interface DrawnLens {
  diameterUm: number
  sagUm: number
  shape: 'spherical' | 'parabolic' | 'conic' | 'measured'
  conicConstant?: number
  profile?: ReadonlyArray<readonly [number, number]>
}

/** s(ρ) in µm for 0 ≤ ρ ≤ D/2, or null when a measured cap has no usable profile. */
export function capDepthFn(l: DrawnLens): ((rhoUm: number) => number) | null {
  const a = l.diameterUm / 2, h = l.sagUm
  if (l.shape === 'measured') {
    const rows = l.profile
    if (!rows || rows.length < 3 || !(rows[rows.length - 1]![0] > 0) || !(rows[0]![1] > rows[rows.length - 1]![1])) return null
    const p = buildProfile(rows)
    const scratch = new Float64Array(2)
    return (rho) => measuredSagUm(p, Math.min(rho, a), a, h, scratch)
  }
  const k = shapeConicConstant(l.shape, l.conicConstant)
  const c = conicCurvaturePerUm(l.diameterUm, h, k)
  return (rho) => conicSagUm(rho, c, k)
}
