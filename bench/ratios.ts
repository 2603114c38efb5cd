// npx tsx bench/ratios.ts [rounds]: the two speed ratios of the polarised/spectral and thin-film issues, interleaved in
// one process (rounds of 100 000 rays of each variant in turn, rays/s by this process's CPU time, median over the
// rounds), which is steadier on a shared machine than absolute figures.
//   polarised + spectral / averaged monochrome on the close-packed example, device + traced companion (as bench/run.ts)
//   thin-film source / sheet emitter under the same film, device rays only, polarised and averaged
import { loadavg } from 'node:os'
import { scenarioSchema } from '../shared/types/scenario'
import { createTally, packScene, planChunks, prepareRun, traceRange, type RunScenes } from '../shared/optics'
import { benchScenarios } from './scenarios'

const rounds = Number(process.argv[2] ?? 11), roundRays = 100_000
if (!Number.isInteger(rounds) || rounds < 1) throw new Error(`rounds must be a whole number ≥ 1: got ${process.argv[2]}`)
const mk = (n: string) => prepareRun(scenarioSchema.parse(benchScenarios[n]!), { companion: 'traced' })
const traceOnce = (run: RunScenes, colour: boolean, seed: number) => {
  for (const [f, c] of planChunks(roundRays)) {
    traceRange(run.device, f, c, seed, createTally(colour))
    if (run.planar) traceRange(run.planar, f, c, seed, createTally(colour), undefined, 1)
  }
}
const cpuRate = (fn: () => void) => { const c0 = process.cpuUsage(); fn(); const u = process.cpuUsage(c0); return roundRays / ((u.user + u.system) / 1e6) }
const median = (a: number[]) => [...a].sort((x, y) => x - y)[a.length >> 1]!
function interleaved(jobs: Array<(k: number) => void>): number[] {
  jobs.forEach((j) => j(0)) // warm-up
  const rates: number[][] = jobs.map(() => [])
  for (let k = 1; k <= rounds; k++) jobs.forEach((j, i) => rates[i]!.push(cpuRate(() => j(k))))
  return rates.map(median)
}
console.log(`load average (1 min) at the start: ${loadavg()[0]!.toFixed(2)}; ${rounds} rounds × ${roundRays} rays, rays/s by CPU time (median)`)
{
  const r = [mk('hex-hemisphere-close-packed'), mk('hex-hemisphere-close-packed-polarized'), mk('hex-hemisphere-close-packed-polarized-spectral')]
  const m = interleaved(r.map((run, i) => (k: number) => traceOnce(run, i === 2, 200 + k)))
  console.log(`averaged ${m[0]!.toFixed(0)}, polarized ${m[1]!.toFixed(0)}, polarized + spectral (colour tally) ${m[2]!.toFixed(0)} rays/s`)
  console.log(`  polarized / averaged ${(m[1]! / m[0]!).toFixed(3)}; polarized + spectral / averaged ${(m[2]! / m[0]!).toFixed(3)} (target ≥ 0.6)`)
}
{
  const names = ['hex-hemisphere-thin-film-polarized', 'hex-hemisphere-close-packed-polarized', 'hex-hemisphere-thin-film', 'hex-hemisphere-close-packed']
  const scenes = names.map((n) => packScene(scenarioSchema.parse(benchScenarios[n]!)))
  const m = interleaved(scenes.map((sc) => (k: number) => { traceRange(sc, 0, roundRays, 300 + k, createTally()) }))
  console.log(`device rays: thin-film polarized ${m[0]!.toFixed(0)}, sheet polarized ${m[1]!.toFixed(0)}, thin-film averaged ${m[2]!.toFixed(0)}, sheet averaged ${m[3]!.toFixed(0)} rays/s`)
  console.log(`  thin-film / sheet: polarized ${(m[0]! / m[1]!).toFixed(3)}, averaged ${(m[2]! / m[3]!).toFixed(3)} (target ≥ 0.8)`)
}
console.log(`load average (1 min) at the end: ${loadavg()[0]!.toFixed(2)}`)
