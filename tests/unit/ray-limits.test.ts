// The one ray limit, in the user's rays (shared/types/ray-limits.ts): the team's queue counts traced rays; a lens
// design over a pixel source traces each ray twice (device + traced planar companion), so the request schema's 10⁹
// per cell and the team's 10⁹ traced rays give 5·10⁸ for one such run; over an extended source the companion is a
// quadrature (no rays) and the limit is 10⁹. The refusal says the same number the form does.
import { describe, expect, it } from 'vitest'
import { DEFAULT_TEAM_RAY_LIMIT, MAX_RAYS_PER_CELL, maxRaysPerCell, rayLimitMessage, tracedPerRay } from '../../shared/types/ray-limits'
import { precisionSchema } from '../../shared/types/sweep'

const lens = { lensArray: { pitchUm: 10 }, emitter: { source: { shape: 'disc' } } }
const lensExtended = { lensArray: { pitchUm: 10 }, emitter: { source: { shape: 'extended' } } }
const flat = { lensArray: null }

describe('the most rays a run may ask for', () => {
  it('a lens design over a pixel counts twice; over an extended source (quadrature companion) and a flat one, once', () => {
    expect(tracedPerRay(lens)).toBe(2)
    expect(tracedPerRay(lensExtended)).toBe(1)
    expect(tracedPerRay(flat)).toBe(1)
    expect(maxRaysPerCell(DEFAULT_TEAM_RAY_LIMIT, tracedPerRay(lens))).toBe(500_000_000)
    expect(maxRaysPerCell(DEFAULT_TEAM_RAY_LIMIT, tracedPerRay(flat))).toBe(1_000_000_000)
  })

  it('a sweep shares the limit among its cells; what is waiting is taken off', () => {
    expect(maxRaysPerCell(1e9, 25 * 2)).toBe(20_000_000)
    expect(maxRaysPerCell(1e9, 1, 8e8)).toBe(200_000_000)
    expect(maxRaysPerCell(1e9, 2, 1.2e9)).toBe(0)
  })

  it('never above the request schema\'s own bound per cell', () => {
    expect(maxRaysPerCell(1e12, 1)).toBe(MAX_RAYS_PER_CELL)
    expect(precisionSchema.safeParse({ rays: MAX_RAYS_PER_CELL }).success).toBe(true)
    expect(precisionSchema.safeParse({ rays: MAX_RAYS_PER_CELL + 1 }).success).toBe(false)
  })
})

describe('the refusal names the same limit', () => {
  it('a 6·10⁸-ray lens run: at most 500 M, and why', () => {
    const m = rayLimitMessage(600_000_000, 1, 2, 0, 1e9)
    expect(m).toContain('This would queue 600 M rays, and at most 500 M can be queued now')
    expect(m).toContain('each ray of a lens design over a pixel source (or with a spectrum) is traced twice')
  })
  it('a flat run with 800 M waiting: at most 200 M more', () => {
    expect(rayLimitMessage(400_000_000, 1, 1, 800_000_000, 1e9))
      .toBe('This would queue 400 M rays, and at most 200 M more can be queued now: your team already has 800 M waiting and the limit is 1.00 G. Use fewer rays or cells, or wait for running work to finish.')
  })
  it('a 25-cell lens sweep: per cell', () => {
    expect(rayLimitMessage(40_000_000, 25, 50, 0, 1e9)).toContain('This would queue 25 cells × 40 M rays, and at most 20 M rays per cell can be queued now')
  })
  it('counts are exact, so a refused count never reads like the limit', () => {
    expect(rayLimitMessage(500_001_000, 1, 2, 0, 1e9)).toContain('This would queue 500 001 000 rays, and at most 500 M can be queued now')
    expect(rayLimitMessage(1e9, 3, 3, 0, 1e9)).toContain('at most 333 333 333 rays per cell')
  })
  it('nothing fits: says so instead of "at most 0"', () => {
    expect(rayLimitMessage(1000, 1, 2, 1e9, 1e9)).toContain('and no more can be queued now')
  })
})
