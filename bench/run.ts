// npm run bench: rays/s on the named reference scenarios, in-process on one thread and on the piscina pool at 1
// thread and at all threads. "rays/s" counts device rays; since 2026-12-02 the planar companion comes from
// quadrature (no companion ray is traced with them; before, each included one), exactly as a real run does.
// Figures depend on machine load: re-run when quiet.
// Usage: npm run bench -- [--rays N] [name ...]; the polarised/spectral ratio section (15 interleaved rounds) always runs.
import { availableParallelism, cpus, loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import { scenarioSchema } from '../shared/types/scenario'
import { createTally, mergeRunTallies, packScene, planChunks, prepareRun, traceChunk, traceRange, T_EVENTS, T_WAVEGUIDED, type RunScenes } from '../shared/optics'
import { createTracePoolReady, traceOnPool } from '../scripts/trace-pool'
import { benchScenarios } from './scenarios'

const { values, positionals: names } = parseArgs({ options: { rays: { type: 'string', default: '2000000' } }, allowPositionals: true })
const rays = Number(values.rays)
if (!Number.isInteger(rays) || rays < 1) throw new Error(`--rays must be a whole number ≥ 1: got ${values.rays}`)
const unknown = names.filter((n) => !Object.hasOwn(benchScenarios, n))
if (unknown.length) throw new Error(`unknown scenario(s) ${unknown.join(', ')}; known: ${Object.keys(benchScenarios).join(', ')}`)
const selected = names.length ? names : Object.keys(benchScenarios)
const all = Math.max(1, availableParallelism())

function fmt(n: number): string {
  return Math.round(n).toLocaleString('en-US').padStart(11)
}

console.log(`load average (1 min) at the start: ${loadavg()[0]!.toFixed(2)}`)
console.log(`Lensfield bench ${new Date().toISOString().slice(0, 10)} — ${cpus()[0]?.model ?? 'cpu'} × ${all}, node ${process.version}, ${rays} rays per figure`)
const pools = new Map<number, Awaited<ReturnType<typeof createTracePoolReady>>>()
for (const t of new Set([1, all])) pools.set(t, await createTracePoolReady(t))
for (const name of selected) {
  const input = benchScenarios[name]!
  const sc = scenarioSchema.parse(input)
  const run = prepareRun(sc)
  // in-process, one thread (after a warm-up so the JIT has settled)
  traceChunk(run, 0, 50_000, 99)
  const t0 = performance.now()
  const total = { device: createTally(), planar: run.planar ? createTally() : null }
  for (const [f, c] of planChunks(rays)) mergeRunTallies(total, traceChunk(run, f, c, 1))
  const inProc = rays / ((performance.now() - t0) / 1000)
  const poolRate: number[] = []
  for (const t of [1, all]) {
    const pool = pools.get(t)!
    await traceOnPool(sc, { rays: 100_000 * t, seed: 98, threads: t, pool }) // warm-up every worker
    const t1 = performance.now()
    await traceOnPool(sc, { rays, seed: 1, threads: t, pool })
    poolRate.push(rays / ((performance.now() - t1) / 1000))
  }
  console.log(`${name.padEnd(30)} in-process (tsx, unbundled) ${fmt(inProc)} rays/s | pool 1 thread ${fmt(poolRate[0]!)} | pool ${all} threads ${fmt(poolRate[1]!)} rays/s (×${(poolRate[1]! / poolRate[0]!).toFixed(2)})`)
}
for (const p of pools.values()) await p.destroy()
// Thin-film source against the sheet emitter under the same film: device rays only (traceRange, one thread,
// in-process), since a thin-film run traces no companion rays. Target: ratio ≥ 0.8. Every thin-film ray has entered
// the glass; many of the sheet emitter's rays end at their first encounter (totally reflected in the emitter layer),
// so the sheet's waveguided share and both encounter counts are printed beside the ratio.
const devicePairs: Array<[string, string]> = [['hex-hemisphere-thin-film-polarized', 'hex-hemisphere-close-packed-polarized'], ['hex-hemisphere-thin-film', 'hex-hemisphere-close-packed']]
function deviceRate(name: string): { rate: number; waveguided: number; events: number } {
  const scene = packScene(scenarioSchema.parse(benchScenarios[name]!))
  traceRange(scene, 0, 50_000, 99, createTally())
  const t = createTally()
  const t0 = performance.now()
  traceRange(scene, 0, rays, 1, t)
  return { rate: rays / ((performance.now() - t0) / 1000), waveguided: t[T_WAVEGUIDED]! / rays, events: t[T_EVENTS]! / rays }
}
for (const [tf, sheet] of devicePairs) {
  if (!selected.includes(tf) || !selected.includes(sheet)) continue
  const a = deviceRate(tf), b = deviceRate(sheet)
  console.log(`device rays only: ${tf} ${fmt(a.rate)} rays/s (${a.events.toFixed(2)} encounters/ray), ${sheet} ${fmt(b.rate)} rays/s (${b.events.toFixed(2)} encounters/ray, ${(100 * b.waveguided).toFixed(0)} % end waveguided in the emitter layer) — thin-film / sheet ×${(a.rate / b.rate).toFixed(2)} (target ≥ 0.8)`)
}

// Polarised and spectral against averaged monochrome on the example, interleaved in-process: rounds of
// 100 000 rays (device + traced companion) of each variant in turn, rays/s by this process's CPU time (other work on a
// shared machine slows the clock, much less the CPU time), median over the rounds. The spectral variant is timed
// with its colour tally and, for the tally's cost, with plain tallies (createTally(): nothing colour is counted).
{
  const ref = 'hex-hemisphere-close-packed'
  const variants: Array<[string, string, boolean]> = [
    ['averaged', ref, false],
    ['polarized', 'hex-hemisphere-close-packed-polarized', false],
    ['polarized + spectral', 'hex-hemisphere-close-packed-polarized-spectral', true],
    ['polarized + spectral, no colour tally', 'hex-hemisphere-close-packed-polarized-spectral', false],
    // the same spectrum on the polarised film with its constant indices: the spectral path's own cost, without
    // the N-BK7 glass's different physics (more encounters per ray)
    ['polarized + spectrum, constant indices', 'hex-hemisphere-close-packed-polarized', true],
  ]
  const pol = benchScenarios['hex-hemisphere-close-packed-polarized']!
  const runs = variants.map(([label, n]) => prepareRun(scenarioSchema.parse(label.includes('constant indices')
    ? { ...pol, emitter: { ...pol.emitter, spectrum: { peakNm: 530, fwhmNm: 60 } } }
    : benchScenarios[n]!), { companion: 'traced' })) // like for like: every variant traces its companion
  const roundRays = 100_000, rounds = 15
  // traceChunk's work (device on stream 0, companion on stream 1), with or without the colour block
  const traceOnce = (run: RunScenes, colour: boolean, seed: number) => {
    for (const [f, c] of planChunks(roundRays)) {
      traceRange(run.device, f, c, seed, createTally(colour))
      if (run.planar) traceRange(run.planar, f, c, seed, createTally(colour), undefined, 1)
    }
  }
  runs.forEach((r, i) => traceOnce(r, variants[i]![2], 97)) // warm-up
  const rates: number[][] = variants.map(() => [])
  for (let k = 0; k < rounds; k++) {
    runs.forEach((r, i) => {
      const c0 = process.cpuUsage()
      traceOnce(r, variants[i]![2], 200 + k)
      const u = process.cpuUsage(c0)
      rates[i]!.push(roundRays / ((u.user + u.system) / 1e6))
    })
  }
  const median = (a: number[]) => { const b = [...a].sort((x, y) => x - y); return b[b.length >> 1]! }
  const m = rates.map(median)
  console.log(`interleaved, ${rounds} rounds × ${roundRays} rays, rays/s by CPU time (median):`)
  variants.forEach(([label], i) => console.log(`  ${label.padEnd(40)} ${fmt(m[i]!)} rays/s  ${(m[i]! / m[0]!).toFixed(3)} × averaged`))
  console.log(`  polarized + spectral / averaged = ${(m[2]! / m[0]!).toFixed(3)} (target ≥ 0.6); colour tally costs ${(100 * (1 - m[2]! / m[3]!)).toFixed(1)} %`)
}
console.log(`load average (1 min) at the end: ${loadavg()[0]!.toFixed(2)} on ${all} cores — figures are depressed when it exceeds ~0.3`)
