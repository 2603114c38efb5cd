// npm run bench:panel: rays/s of the fused loop (traceRange, one thread, in-process) on the infinite array and on
// finite panels of the same stack (every edge kind), so the cost of the panel path and the infinite path's speed
// are on record. With --baseline DIR (a folder holding an older shared/, e.g. `git archive <commit> shared | tar -x
// -C DIR`, placed inside the repository so its imports resolve) the infinite scenarios are also traced by that
// code, interleaved round by round, and the median ratio new/old is printed: the infinite path must not get slower
// beyond noise. Two codes in one process JIT differently (the second loaded runs cold paths of its own), so for
// the record prefer --core DIR (trace only the infinite scenarios with that code) in alternating processes:
//   for i in 1 2 3 4 5; do npm run bench:panel -- --core DIR; npm run bench:panel -- --core .; done Figures depend on machine load.
// Usage: npm run bench:panel -- [--rays N] [--rounds R] [--baseline DIR | --core DIR]
import { loadavg } from 'node:os'
import { resolve } from 'node:path'
import { parseArgs } from 'node:util'
import { pathToFileURL } from 'node:url'
import { scenarioSchema, type ScenarioInput } from '../shared/types/scenario'
import { createTally, packScene, traceRange } from '../shared/optics'
import { benchScenarios } from './scenarios'

const { values } = parseArgs({ options: { rays: { type: 'string', default: '400000' }, rounds: { type: 'string', default: '7' }, baseline: { type: 'string' }, core: { type: 'string' } } })
const rays = Number(values.rays), rounds = Number(values.rounds)
if (!Number.isInteger(rays) || rays < 1) throw new Error(`--rays must be a whole number ≥ 1: got ${values.rays}`)
if (!Number.isInteger(rounds) || rounds < 1) throw new Error(`--rounds must be a whole number ≥ 1: got ${values.rounds}`)

type Trace = (scene: Float64Array, first: number, count: number, seed: number, t: Float64Array) => number
interface Core { pack: (input: ScenarioInput) => Float64Array; tally: (panel: boolean) => Float64Array; trace: Trace }
const current: Core = {
  pack: (i) => packScene(scenarioSchema.parse(i)),
  tally: (panel) => createTally(false, panel),
  trace: (s, f, c, seed, t) => traceRange(s, f, c, seed, t),
}
async function baselineCore(dir: string): Promise<Core> {
  const url = (p: string) => pathToFileURL(resolve(dir, p)).href
  const optics = await import(url('shared/optics/index.ts'))
  const sc = await import(url('shared/types/scenario.ts'))
  return {
    pack: (i) => optics.packScene(sc.scenarioSchema.parse(i)),
    tally: () => optics.createTally(),
    trace: (s, f, c, seed, t) => optics.traceRange(s, f, c, seed, t),
  }
}

const infinite = ['planar', 'hex-hemisphere-close-packed', 'hex-hemisphere-close-packed-polarized']
const glass = { index: 1.5, thicknessUm: 700, absorptionPerMm: 0 }
const film = { ...benchScenarios['hex-hemisphere-close-packed']!, substrate: glass }
const panels: Record<string, ScenarioInput> = {
  'infinite (0.7 mm glass)': film,
  'panel 50 mm absorbing': { ...film, panel: { widthMm: 50, heightMm: 50, edges: 'absorbing' } },
  'panel 50 mm mirrored': { ...film, panel: { widthMm: 50, heightMm: 50, edges: 'mirrored' } },
  'panel 50 mm ground': { ...film, panel: { widthMm: 50, heightMm: 50, edges: 'ground' } },
  'panel 50 mm polished, meter': {
    ...film, panel: { widthMm: 50, heightMm: 50, edges: 'polished', detector: { kind: 'luminanceMeter', spotCentreMm: [0, 0], spotDiameterMm: 10, acceptanceDeg: 1 } },
  },
  'panel 5 mm absorbing': { ...film, panel: { widthMm: 5, heightMm: 5, edges: 'absorbing' } },
}

function rate(core: Core, input: ScenarioInput): number {
  const scene = core.pack(input)
  const panel = (input as { panel?: unknown }).panel !== undefined
  const t = core.tally(panel)
  const t0 = performance.now()
  core.trace(scene, 0, rays, 1, t)
  return rays / ((performance.now() - t0) / 1000)
}
const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.floor(s.length / 2)]! }
const fmt = (n: number) => Math.round(n).toLocaleString('en-US').padStart(11)

console.log(`load average (1 min) at the start: ${loadavg()[0]!.toFixed(2)}; ${rays} rays per figure, ${rounds} rounds, node ${process.version}`)
if (values.core) {
  // the infinite scenarios only, traced by the code in DIR ('.' for this one)
  const core = values.core === '.' ? current : await baselineCore(values.core)
  for (const n of infinite) rate(core, benchScenarios[n]!)
  const line = infinite.map((n) => {
    const xs: number[] = []
    for (let i = 0; i < rounds; i++) xs.push(rate(core, benchScenarios[n]!))
    return `${n} ${fmt(median(xs))}`
  })
  console.log(`core ${values.core}: ${line.join(' |')} rays/s (median of ${rounds})`)
  process.exit(0)
}
const base = values.baseline ? await baselineCore(values.baseline) : null
for (const core of base ? [current, base] : [current]) for (const n of infinite) rate(core, benchScenarios[n]!) // warm-up
if (base) {
  console.log('infinite array, this code against the baseline (interleaved; median of rounds):')
  for (const n of infinite) {
    const a: number[] = [], b: number[] = [], r: number[] = []
    for (let i = 0; i < rounds; i++) {
      const x = rate(current, benchScenarios[n]!), y = rate(base, benchScenarios[n]!)
      a.push(x); b.push(y); r.push(x / y)
    }
    console.log(`  ${n.padEnd(40)} now ${fmt(median(a))} rays/s | baseline ${fmt(median(b))} rays/s | ratio ${median(r).toFixed(3)} (min ${Math.min(...r).toFixed(3)}, max ${Math.max(...r).toFixed(3)})`)
  }
}
console.log('finite panels, hex hemispheres on 0.7 mm glass (median of rounds):')
for (const [n, input] of Object.entries(panels)) {
  rate(current, input)
  const xs: number[] = []
  for (let i = 0; i < Math.max(1, Math.ceil(rounds / 2)); i++) xs.push(rate(current, input))
  console.log(`  ${n.padEnd(40)} ${fmt(median(xs))} rays/s`)
}
