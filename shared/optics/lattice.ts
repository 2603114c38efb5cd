// The lens lattice: basis, nearest site and cell sampling (one of each; the tracer, the preview and the surface
// export all use these). Hexagonal: site vectors (p, 0), (p/2, p√3/2); square: (p, 0), (0, p); a site at the
// origin. Lengths in µm.

export const HEX_ROW_FACTOR = 0.8660254037844386 // √3/2

/** The two site vectors [[e1x, e1y], [e2x, e2y]] of a lattice of pitch p. */
export function latticeBasis(hexagonal: boolean, pitchUm: number): [[number, number], [number, number]] {
  return hexagonal ? [[pitchUm, 0], [0.5 * pitchUm, pitchUm * HEX_ROW_FACTOR]] : [[pitchUm, 0], [0, pitchUm]]
}

/**
 * Nearest lattice site to (x, y), written to out[1], out[2] (out[0] untouched); row2Um = p√3 (unused when square).
 * The hexagonal lattice is the union of two rectangular lattices p × p√3, the second offset by (p/2, p√3/2): the
 * nearer of their two nearest sites. Void, so that a call V8 does not inline costs no boxed double.
 */
export function wrapToSite(hex: boolean, pitch: number, row2Um: number, x: number, y: number, out: Float64Array): void {
  const u = x / pitch
  if (!hex) {
    out[1] = Math.round(u) * pitch; out[2] = Math.round(y / pitch) * pitch
    return
  }
  const v = y / row2Um
  const ax = Math.round(u), ay = Math.round(v)
  const bx = Math.round(u - 0.5) + 0.5, by = Math.round(v - 0.5) + 0.5
  const ex = (u - ax) * pitch, ey = (v - ay) * row2Um, fx = (u - bx) * pitch, fy = (v - by) * row2Um
  if (ex * ex + ey * ey <= fx * fx + fy * fy) { out[1] = ax * pitch; out[2] = ay * row2Um } else { out[1] = bx * pitch; out[2] = by * row2Um }
}

const siteScratch = new Float64Array(3)

/** Site nearest to (x, y) (wrapToSite); writes [sx, sy, i, j] into out, site = i·e1 + j·e2. */
export function nearestSite(hexagonal: boolean, pitchUm: number, x: number, y: number, out: Float64Array): void {
  const row2 = 2 * pitchUm * HEX_ROW_FACTOR
  wrapToSite(hexagonal, pitchUm, row2, x, y, siteScratch)
  const sx = siteScratch[1]!, sy = siteScratch[2]!
  out[0] = sx; out[1] = sy
  if (!hexagonal) { out[2] = Math.round(sx / pitchUm); out[3] = Math.round(sy / pitchUm); return }
  const j = Math.round((2 * sy) / row2)
  out[2] = Math.round(sx / pitchUm - 0.5 * j); out[3] = j
}

/** Uniform point in the lattice cell spanned by (p, 0) and the second site vector (hexagonal or square). */
export function sampleCell(hexagonal: boolean, pitchUm: number, u1: number, u2: number, out: Float64Array): void {
  if (hexagonal) {
    out[0] = pitchUm * (u1 + 0.5 * u2)
    out[1] = pitchUm * 0.8660254037844386 * u2
  } else {
    out[0] = pitchUm * u1
    out[1] = pitchUm * u2
  }
}
