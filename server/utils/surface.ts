// The lens surface of a candidate for mastering: a binary STL height-field patch of N × M lenses and a radial sag
// table. Frame as in shared/optics/geometry.ts: z up, the flat land at z = 0, a cap on every lattice site with its
// vertex at z = sag. Lengths in µm (the STL's header says so; CAD tools ask for the unit on import).
import { conicCurvaturePerUm, conicSagUm, shapeConicConstant } from '../../shared/types/geometry'
import { buildProfile, measuredSagUm } from '../../shared/optics/profile'
import { HEX_ROW_FACTOR, nearestSite } from '../../shared/optics/geometry'
import { csvCommentRow } from '../../shared/utils/csv-cell'
import { vec3 } from 'gl-matrix'

export interface LensSpec {
  lattice: 'hexagonal' | 'square'
  pitchUm: number
  diameterUm: number
  sagUm: number
  shape: string
  conicConstant?: number
  profile?: number[][]
}

/** Depth below the vertex s(ρ) of one cap (ρ ≤ a). */
export function capDepthFn(lens: LensSpec): (rhoUm: number) => number {
  const a = lens.diameterUm / 2
  if (lens.shape === 'measured' && lens.profile) {
    const p = buildProfile(lens.profile)
    const scratch = new Float64Array(2)
    return (rho) => measuredSagUm(p, rho, a, lens.sagUm, scratch)
  }
  const k = shapeConicConstant(lens.shape as 'spherical' | 'parabolic' | 'conic', lens.conicConstant)
  const c = conicCurvaturePerUm(lens.diameterUm, lens.sagUm, k)
  return (rho) => Math.min(lens.sagUm, conicSagUm(rho, c, k))
}

/** Height above the land at (x, y). */
export function surfaceHeightFn(lens: LensSpec): (xUm: number, yUm: number) => number {
  const depth = capDepthFn(lens)
  const a = lens.diameterUm / 2
  const site = new Float64Array(4)
  return (x, y) => {
    nearestSite(lens.lattice === 'hexagonal', lens.pitchUm, x, y, site)
    const rho = Math.hypot(x - site[0]!, y - site[1]!)
    return rho >= a ? 0 : Math.max(0, lens.sagUm - depth(rho))
  }
}

export const MAX_STL_TRIANGLES = 2_000_000

/** Grid of the patch: N lenses along x, M rows along y, samplesPerPitch grid steps per pitch along x. */
export function patchGrid(lens: LensSpec, lensesX: number, lensesY: number, samplesPerPitch: number) {
  const widthUm = lensesX * lens.pitchUm
  const rowUm = lens.lattice === 'hexagonal' ? lens.pitchUm * HEX_ROW_FACTOR : lens.pitchUm
  const heightUm = lensesY * rowUm
  const nx = lensesX * samplesPerPitch
  const ny = Math.max(1, Math.round(heightUm / (lens.pitchUm / samplesPerPitch)))
  return { widthUm, heightUm, nx, ny, triangles: 2 * nx * ny }
}

/** Binary STL (80-byte header, uint32 count, 50 bytes per triangle) of the top surface of the patch. */
export function surfaceStl(lens: LensSpec, lensesX: number, lensesY: number, samplesPerPitch: number): Buffer {
  const g = patchGrid(lens, lensesX, lensesY, samplesPerPitch)
  const height = surfaceHeightFn(lens)
  // Start half a pitch in, so the patch begins on the land between caps rather than through a vertex.
  const x0 = -lens.pitchUm / 2, y0 = -(lens.lattice === 'hexagonal' ? lens.pitchUm * HEX_ROW_FACTOR : lens.pitchUm) / 2
  const zs = new Float64Array((g.nx + 1) * (g.ny + 1))
  for (let j = 0; j <= g.ny; j++) {
    for (let i = 0; i <= g.nx; i++) zs[j * (g.nx + 1) + i] = height(x0 + (i * g.widthUm) / g.nx, y0 + (j * g.heightUm) / g.ny)
  }
  const buf = Buffer.alloc(84 + 50 * g.triangles)
  buf.write(`Lensfield lens patch ${lensesX}x${lensesY} ${lens.lattice} pitch ${lens.pitchUm} um; units: micrometres`.slice(0, 80), 0, 'ascii')
  buf.writeUInt32LE(g.triangles, 80)
  let off = 84
  const P = (i: number, j: number): [number, number, number] => [x0 + (i * g.widthUm) / g.nx, y0 + (j * g.heightUm) / g.ny, zs[j * (g.nx + 1) + i]!]
  // Facet normal n = (b − a) × (c − a) / |…| with gl-matrix, in double-precision scratch vectors made once (the STL
  // stores it as float32); a degenerate facet keeps a zero normal, which STL readers recompute.
  const u = new Float64Array(3) as unknown as vec3, v = new Float64Array(3) as unknown as vec3, n = new Float64Array(3) as unknown as vec3
  const tri = (a: [number, number, number], b: [number, number, number], c: [number, number, number]) => {
    vec3.sub(u, b, a)
    vec3.sub(v, c, a)
    vec3.normalize(n, vec3.cross(n, u, v))
    for (const x of [n[0], n[1], n[2], ...a, ...b, ...c]) { buf.writeFloatLE(x, off); off += 4 }
    buf.writeUInt16LE(0, off); off += 2
  }
  for (let j = 0; j < g.ny; j++) {
    for (let i = 0; i < g.nx; i++) {
      // Counter-clockwise seen from above: normals point up (+z), out of the lens film.
      const a = P(i, j), b = P(i + 1, j), c = P(i + 1, j + 1), d = P(i, j + 1)
      tri(a, b, c)
      tri(a, c, d)
    }
  }
  return buf
}

/** Radial sag table of one cap for mastering: r_um, height_um (above the land), sag_um (depth below the vertex). */
export function sagTableCsv(lens: LensSpec, points: number, title: string): string {
  const depth = capDepthFn(lens)
  const a = lens.diameterUm / 2
  const lines = [
    csvCommentRow('Lensfield sag table', [title]),
    `# lattice ${lens.lattice}, pitch_um ${lens.pitchUm}, diameter_um ${lens.diameterUm}, sag_um ${lens.sagUm}, shape ${lens.shape}${lens.conicConstant !== undefined ? `, conic_constant ${lens.conicConstant}` : ''}`,
    'r_um,height_um,sag_um',
  ]
  for (let i = 0; i < points; i++) {
    const r = (a * i) / (points - 1)
    const s = depth(r)
    lines.push(`${r.toPrecision(8)},${(lens.sagUm - s).toPrecision(8)},${s.toPrecision(8)}`)
  }
  return lines.join('\n') + '\n'
}
