// The simulate CLI end to end (common practice: exit codes and the last-line JSON contract) and the worker's
// cooperative abort.
import { describe, expect, it } from 'vitest'
import { execFileSync, spawnSync } from 'node:child_process'
import { mkdirSync, writeFileSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { valueSymbol } from 'piscina'
import traceTaskRaw, { type TraceTask } from '../../workers/trace'
import { runTalliesFromBuffer, T_RAYS } from '../../shared/optics'

const root = fileURLToPath(new URL('../..', import.meta.url))
const dir = `${root}test-output/cli`
mkdirSync(dir, { recursive: true })
const example = {
  emitter: { index: 1.7, angularProfile: 'isotropic', source: { shape: 'extended' } },
  reflector: { reflectance: 0.8, diffuseFraction: 0 },
  substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5, shape: 'spherical', index: 1.5 },
  trace: { rays: 1000000, seed: 1, fresnel: 'averaged' },
}
// Outside a pool the task returns piscina's move() wrapper: unwrap it to the transferred buffer.
const traceTask = (t: TraceTask): ArrayBuffer => (traceTaskRaw(t) as unknown as Record<symbol, ArrayBuffer>)[valueSymbol]!
function run(args: string[]) {
  return spawnSync('node', ['scripts/simulate.mjs', ...args], { cwd: root, encoding: 'utf8' })
}

describe('simulate CLI', () => {
  it('--json prints one JSON object on the last stdout line; the same seed gives the same numbers on 1 and 2 threads (seed 1301)', () => {
    writeFileSync(`${dir}/ok.json`, JSON.stringify(example))
    const a = JSON.parse(execFileSync('node', ['scripts/simulate.mjs', `${dir}/ok.json`, '--rays', '40000', '--seed', '1301', '--threads', '1', '--json'], { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    const b = JSON.parse(execFileSync('node', ['scripts/simulate.mjs', `${dir}/ok.json`, '--rays', '40000', '--seed', '1301', '--threads', '2', '--json'], { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    expect(a.rays).toBe(40000)
    expect(a.seed).toBe(1301)
    for (const k of ['extraction', 'extractionStdErr', 'enhancement', 'enhancementStdErr', 'losses', 'intensity', 'luminance', 'planar']) expect(b[k]).toEqual(a[k])
  })
  it('accepts Fresnel mode "polarized" (the result says so; 1 and 2 threads agree, seed 1302) and refuses an unknown mode naming the Fresnel mode', () => {
    writeFileSync(`${dir}/pol.json`, JSON.stringify({ ...example, trace: { ...example.trace, fresnel: 'polarized' } }))
    const args = (t: string) => ['scripts/simulate.mjs', `${dir}/pol.json`, '--rays', '30000', '--seed', '1302', '--threads', t, '--json']
    const a = JSON.parse(execFileSync('node', args('1'), { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    const b = JSON.parse(execFileSync('node', args('2'), { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    expect(a.fresnel).toBe('polarized')
    for (const k of ['extraction', 'extractionStdErr', 'enhancement', 'intensity', 'planar']) expect(b[k]).toEqual(a[k])
    const text = run([`${dir}/pol.json`, '--rays', '5000', '--threads', '1'])
    expect(text.status).toBe(0)
    expect(text.stdout).toContain('Fresnel polarized')
    writeFileSync(`${dir}/badmode.json`, JSON.stringify({ ...example, trace: { ...example.trace, fresnel: 'polarised-ish' } }))
    const bad = run([`${dir}/badmode.json`])
    expect(bad.status).toBe(2)
    expect(bad.stderr).toContain('Fresnel mode must be one of')
  })
  it('the flat device comes from quadrature by default (σ 0) and is traced with --companion traced (σ > 0, within 4σ of it) — seed 1303', () => {
    const one = (extra: string[]) => JSON.parse(execFileSync('node', ['scripts/simulate.mjs', `${dir}/ok.json`, '--rays', '30000', '--seed', '1303', '--threads', '1', '--json', ...extra], { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    const q = one([]), t = one(['--companion', 'traced'])
    expect(q.planar.method).toBe('quadrature')
    expect(q.planar.extractionStdErr).toBe(0)
    expect(t.planar.method).toBe('traced')
    expect(t.extraction).toBe(q.extraction)
    expect(Math.abs(t.planar.extraction - q.planar.extraction)).toBeLessThanOrEqual(4 * t.planar.extractionStdErr)
    const bad = run([`${dir}/ok.json`, '--companion', 'guess'])
    expect(bad.status).toBe(2)
    expect(bad.stderr).toContain('--companion must be quadrature or traced')
  })
  it('--directions adds reciprocal luminance at those θ (φ 0) with σ, and refuses angles outside 0–90° — seed 1304', () => {
    const r = JSON.parse(execFileSync('node', ['scripts/simulate.mjs', `${dir}/ok.json`, '--rays', '5000', '--seed', '1304', '--threads', '1', '--directions', '0,45', '--json'], { cwd: root, encoding: 'utf8' }).trim().split('\n').pop()!)
    expect(r.luminance.directions.map((d: { thetaDeg: number }) => d.thetaDeg)).toEqual([0, 45])
    for (const d of r.luminance.directions) { expect(d.phiDeg).toBe(0); expect(d.relative).toBeGreaterThan(0); expect(d.relativeStdErr).toBeGreaterThan(0) }
    const bad = run([`${dir}/ok.json`, '--directions', '0,95'])
    expect(bad.status).toBe(2)
    expect(bad.stderr).toContain('--directions must be viewing angles')
  })
  it('exit 2 with the field named for an invalid scenario, bad JSON, a missing file, a bad option', () => {
    writeFileSync(`${dir}/sag.json`, JSON.stringify({ ...example, lensArray: { ...example.lensArray, sagUm: 6 } }))
    writeFileSync(`${dir}/broken.json`, '{ "emitter": ')
    const r1 = run([`${dir}/sag.json`])
    expect(r1.status).toBe(2)
    expect(r1.stderr).toContain('Sag h must be at most D/2 = 5 µm for a spherical cap: got 6 µm')
    const r2 = run([`${dir}/broken.json`])
    expect(r2.status).toBe(2)
    expect(r2.stderr).toContain('is not valid JSON')
    const r3 = run([`${dir}/missing.json`])
    expect(r3.status).toBe(2)
    expect(r3.stderr).toContain('cannot read')
    const r4 = run([`${dir}/sag.json`, '--rays', 'many'])
    expect(r4.status).toBe(2)
    expect(r4.stderr).toContain('--rays must be an integer')
  })
})

describe('worker task', () => {
  it('stops at the next 4096-ray boundary when its abort flag is set, returning a consistent partial tally', () => {
    const flag = new SharedArrayBuffer(4)
    Atomics.store(new Int32Array(flag), 0, 1)
    const t = runTalliesFromBuffer(traceTask({ scenario: example, firstRay: 0, rayCount: 50_000, seed: 1, abortFlag: flag }))
    expect(t.device[T_RAYS]).toBe(4095)
    const full = runTalliesFromBuffer(traceTask({ scenario: example, firstRay: 0, rayCount: 5000, seed: 1 }))
    expect(full.device[T_RAYS]).toBe(5000)
    expect(full.planar).toBeNull() // the companion comes from quadrature: no companion rays
    const traced = runTalliesFromBuffer(traceTask({ scenario: example, companion: 'traced', firstRay: 0, rayCount: 5000, seed: 1 }))
    expect(Array.from(traced.device)).toEqual(Array.from(full.device))
    expect(traced.planar![T_RAYS]).toBe(5000)
  })
})
