// The queue arithmetic of bench/scale-out.ts and the README's fleet example (bench/queue-sizing.ts): closed forms
// checked on hand-worked numbers.
import { describe, expect, it } from 'vitest'
import { batchRaysForOverhead, fleetSizing, queueOverhead } from '../../bench/queue-sizing'

describe('queueOverhead', () => {
  it('splits thread time into tracing and queue time (hand-worked: 2 threads × 10 s, 18 s traced, 100 jobs, 2·10⁷ rays)', () => {
    const o = queueOverhead({ wallSeconds: 10, threads: 2, computeSeconds: 18, jobs: 100, rays: 2e7 })
    expect(o.fraction).toBeCloseTo(0.1, 12)
    expect(o.perJobSeconds).toBeCloseTo(0.02, 12)
    expect(o.secondsPerRay).toBeCloseTo(9e-7, 18)
    expect(o.jobsPerSecond).toBe(10)
  })
  it('never reports negative queue time (rounded compute_ms can sum past the wall time)', () => {
    expect(queueOverhead({ wallSeconds: 1, threads: 1, computeSeconds: 1.001, jobs: 1, rays: 1000 }).fraction).toBe(0)
  })
  it('refuses a zero or missing measure, naming it', () => {
    expect(() => queueOverhead({ wallSeconds: 0, threads: 1, computeSeconds: 1, jobs: 1, rays: 1 })).toThrow(/wallSeconds/)
  })
})

describe('batchRaysForOverhead', () => {
  it('queue time per job ≤ 5 % of batch trace time: 20 ms at 0.5 µs a ray needs 0.02 / (0.05 · 5·10⁻⁷) = 800 000 rays', () => {
    expect(batchRaysForOverhead(0.02, 5e-7, 0.05)).toBe(800_000)
    // and the batch found keeps the share at or under the bound; one 1 000-ray step less passes it
    const b = batchRaysForOverhead(0.0137, 5.39e-7, 0.05)
    expect(0.0137 / (b * 5.39e-7)).toBeLessThanOrEqual(0.05)
    expect(0.0137 / ((b - 1000) * 5.39e-7)).toBeGreaterThan(0.05)
  })
  it('is at least the queue\'s smallest batch (1 000 rays) and refuses a fraction outside (0, 1)', () => {
    expect(batchRaysForOverhead(0, 1e-6)).toBe(1000)
    expect(() => batchRaysForOverhead(0.01, 1e-6, 1)).toThrow(/fraction/)
  })
})

describe('fleetSizing', () => {
  it('100 machines × 7 threads, 5 M-ray batches at 0.55 µs a ray (hand-worked)', () => {
    const f = fleetSizing({
      machines: 100, threadsPerMachine: 7, batchRays: 5_000_000, secondsPerRay: 5.5e-7, connectionsPerProcess: 6,
      databaseCpuSecondsPerJob: 0.006, pollingSeconds: 5, reservedConnections: 40,
    })
    expect(f.threads).toBe(700)
    expect(f.batchSeconds).toBeCloseTo(2.75, 12)
    expect(f.jobsPerSecond).toBeCloseTo(700 / 2.75, 9)
    expect(f.raysPerSecond).toBeCloseTo(700 / 5.5e-7, 0)
    expect(f.connections).toBe(600)
    expect(f.maxConnections).toBe(650)
    expect(f.idlePollsPerSecond).toBe(140)
    expect(f.databaseCores).toBeCloseTo((700 / 2.75) * 0.006, 9)
  })
  it('refuses a zero polling interval', () => {
    expect(() => fleetSizing({
      machines: 1, threadsPerMachine: 1, batchRays: 1000, secondsPerRay: 1e-6, connectionsPerProcess: 6,
      databaseCpuSecondsPerJob: 0.006, pollingSeconds: 0, reservedConnections: 0,
    })).toThrow(/pollingSeconds/)
  })
})
