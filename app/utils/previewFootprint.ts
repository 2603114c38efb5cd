// The pixel footprint for the 3-D preview: the outline of a disc or rectangle source on the emitter plane (z = 0),
// centred on the origin as the core launches it (shared/optics/sampling.ts: sampleDisc, sampleRectangle). µm.
import type { Source } from '#shared/types/scenario'

export interface Footprint {
  shape: 'disc' | 'rectangle'
  /** Closed outline, counter-clockwise seen from above, [x, y] µm (the first point is not repeated). */
  outline: Array<[number, number]>
  /** Emitting area, µm². */
  areaUm2: number
  /** Half the footprint's extent in x and in y, µm. */
  halfWidthUm: number
  halfHeightUm: number
}

/** null for an extended source (the whole panel emits) or a source whose size is not a positive number yet. */
export function sourceFootprint(source: Source | undefined | null, segments = 96): Footprint | null {
  if (!source || source.shape === 'extended') return null
  if (source.shape === 'disc') {
    const r = source.radiusUm
    if (!(r > 0)) return null
    const outline: Array<[number, number]> = []
    for (let i = 0; i < segments; i++) {
      const a = (2 * Math.PI * i) / segments
      outline.push([r * Math.cos(a), r * Math.sin(a)])
    }
    return { shape: 'disc', outline, areaUm2: Math.PI * r * r, halfWidthUm: r, halfHeightUm: r }
  }
  const w = source.widthUm, h = source.heightUm
  if (!(w > 0) || !(h > 0)) return null
  return { shape: 'rectangle', outline: [[-w / 2, -h / 2], [w / 2, -h / 2], [w / 2, h / 2], [-w / 2, h / 2]], areaUm2: w * h, halfWidthUm: w / 2, halfHeightUm: h / 2 }
}
