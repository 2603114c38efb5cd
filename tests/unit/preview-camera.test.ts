// The 3-D preview's orbit camera (app/utils/previewCamera.ts) and pixel footprint (app/utils/previewFootprint.ts):
// the camera never goes below the emitter plane whatever the input, the home view is where the preview opens,
// the footprint has the source's area (πr², w·h: standard geometry).
import { describe, expect, it } from 'vitest'
import { cameraKey, cameraPosition, homeView, orbitBounds, orbitBy, panBy, zoomBy } from '../../app/utils/previewCamera'
import { sourceFootprint } from '../../app/utils/previewFootprint'

const pitch = 10, top = 15
const bounds = orbitBounds(pitch, 40)

describe('orbit camera', () => {
  it('opens at (6, −7.5, 6.5) pitches looking at the top face', () => {
    const p = cameraPosition(homeView(pitch, top))
    expect(p[0]).toBeCloseTo(60, 9)
    expect(p[1]).toBeCloseTo(-75, 9)
    expect(p[2]).toBeCloseTo(65, 9)
    expect(cameraKey(homeView(pitch, top))).toBe('60.00,-75.00,65.00')
  })

  it('stays above the emitter plane: tilting down, zooming out and sliding never take it below z = 0.05 pitch', () => {
    let v = homeView(pitch, top)
    for (let i = 0; i < 200; i++) {
      v = orbitBy(v, 0.3, 0.2, bounds) // keep tilting down
      if (i % 3 === 0) v = zoomBy(v, 1.3, bounds)
      if (i % 5 === 0) v = panBy(v, 7, -11, bounds)
      expect(cameraPosition(v)[2]).toBeGreaterThanOrEqual(bounds.minCameraZUm - 1e-9)
    }
    // tilted all the way: on the bound (the lowest the camera may go), not below it
    expect(cameraPosition(v)[2]).toBeCloseTo(bounds.minCameraZUm, 6)
  })

  it('control: with the floor taken away, the same tilt does go below the plane (so the bound is what holds it)', () => {
    const loose = { ...bounds, minCameraZUm: -1e9 }
    expect(cameraPosition(orbitBy(homeView(pitch, top), 0, 3, loose))[2]).toBeLessThan(0)
    expect(cameraPosition(orbitBy(homeView(pitch, top), 0, 3, bounds))[2]).toBeGreaterThan(0)
  })

  it('zoom keeps its bounds and a slide moves the target sideways, not up', () => {
    const v = homeView(pitch, top)
    expect(zoomBy(v, 1e-6, bounds).distanceUm).toBe(bounds.minDistanceUm)
    expect(zoomBy(v, 1e6, bounds).distanceUm).toBe(bounds.maxDistanceUm)
    const s = panBy(v, 5, 0, bounds)
    expect(s.target[2]).toBe(top)
    expect(Math.hypot(s.target[0], s.target[1])).toBeCloseTo(5, 9)
    expect(panBy(v, 1e6, 1e6, bounds).target.slice(0, 2).every((c) => Math.abs(c) <= 40)).toBe(true)
  })

  it('turning by a full circle returns to the same camera', () => {
    const v = homeView(pitch, top)
    let w = v
    for (let i = 0; i < 24; i++) w = orbitBy(w, Math.PI / 12, 0, bounds)
    expect(cameraKey(w)).toBe(cameraKey(v))
  })
})

describe('pixel footprint', () => {
  it('disc of radius 20 µm: a closed outline on the circle, area π·400 µm²', () => {
    const f = sourceFootprint({ shape: 'disc', radiusUm: 20 })!
    expect(f.shape).toBe('disc')
    expect(f.areaUm2).toBeCloseTo(Math.PI * 400, 9)
    for (const [x, y] of f.outline) expect(Math.hypot(x, y)).toBeCloseTo(20, 9)
  })
  it('rectangle 40 × 30 µm centred on the origin', () => {
    const f = sourceFootprint({ shape: 'rectangle', widthUm: 40, heightUm: 30 })!
    expect(f.outline).toEqual([[-20, -15], [20, -15], [20, 15], [-20, 15]])
    expect(f.areaUm2).toBe(1200)
  })
  it('none for an extended source or a size not yet valid', () => {
    expect(sourceFootprint({ shape: 'extended' })).toBeNull()
    expect(sourceFootprint({ shape: 'disc', radiusUm: -1 } as never)).toBeNull()
  })
})
