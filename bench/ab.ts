// npm run bench:ab: the fused loop today against the fused loop as it was before the readable model was split out
// beside it (issue 12's work began with 889dab3; its parent on shared/optics/tracer.ts is BASELINE below). The old
// shared/ folder is extracted from git into dist/ab/<commit>/, and each side is bundled by esbuild exactly like the
// trace worker (scripts/build-workers.mjs settings) from a small entry that parses a scenario with that side's own
// schema, packs its scenes with the planar companion traced (the old core always traced it; today's is asked to) and
// traces a ray range in-process. Both sides therefore trace the same rays: device + companion.
// Rounds alternate A B / B A, each side tracing the same rays of the same seed; the figure is rays per CPU second of
// this process (one thread), so other work on the machine costs wall time but not the ratio's meaning. Prints the
// ratio today / before per scenario with its median, quartiles and range over the rounds. Criterion: within 3 %.
// Usage: npm run bench:ab -- [--rays N] [--rounds N] [--baseline <commit>] [scenario names…]
import { execFileSync } from 'node:child_process'
import { existsSync, mkdirSync, rmSync, writeFileSync } from 'node:fs'
import { loadavg } from 'node:os'
import { join } from 'node:path'
import { pathToFileURL } from 'node:url'
import { parseArgs } from 'node:util'
import { repoRoot } from '../scripts/postgres'
import { benchScenarios } from './scenarios'

const BASELINE = '39981cb6c037e3224a08fad27c9f1e6d76fa0678'
const { values, positionals } = parseArgs({
  options: { rays: { type: 'string' }, rounds: { type: 'string' }, baseline: { type: 'string' } }, allowPositionals: true,
})
const rays = Number(values.rays ?? 200_000)
const rounds = Number(values.rounds ?? 12)
const baseline = values.baseline ?? BASELINE
const names = positionals.length ? positionals : ['hex-hemisphere-close-packed', 'square-parabolic-absorbing']
if (!Number.isInteger(rays) || rays < 1000) throw new Error(`--rays: a whole number ≥ 1000, got ${values.rays}`)
if (!Number.isInteger(rounds) || rounds < 2) throw new Error(`--rounds: a whole number ≥ 2, got ${values.rounds}`)
for (const n of names) if (!benchScenarios[n]) throw new Error(`unknown scenario ${n}; known: ${Object.keys(benchScenarios).join(', ')}`)

interface Side {
  prepare(scenario: unknown): unknown
  trace(run: unknown, firstRay: number, rayCount: number, seed: number): { device: Float64Array; planar: Float64Array | null }
}

// One entry per side: the same two calls, written against that side's own API.
const ENTRY_TODAY = `import { scenarioSchema } from '${repoRoot}/shared/types/scenario'
import { prepareRun, traceChunk } from '${repoRoot}/shared/optics'
export const prepare = (sc) => prepareRun(scenarioSchema.parse(sc), { companion: 'traced' })
export const trace = (run, first, count, seed) => traceChunk(run, first, count, seed)
`
const entryBefore = (dir: string) => `import { scenarioSchema } from '${dir}/shared/types/scenario'
import { prepareRun, traceChunk } from '${dir}/shared/optics'
export const prepare = (sc) => prepareRun(scenarioSchema.parse(sc))
export const trace = (run, first, count, seed) => traceChunk(run, first, count, seed)
`

async function bundle(entrySource: string, outDir: string): Promise<Side> {
  mkdirSync(outDir, { recursive: true })
  const entry = join(outDir, 'entry.mjs')
  writeFileSync(entry, entrySource)
  const outfile = join(outDir, 'side.mjs')
  const { build } = await import('esbuild')
  await build({
    entryPoints: [entry], outfile, bundle: true, platform: 'node', format: 'esm', target: 'node20', minify: true, keepNames: true,
    logLevel: 'warning', nodePaths: [join(repoRoot, 'node_modules')],
  })
  return await import(pathToFileURL(outfile).href) as Side
}

const abRoot = join(repoRoot, 'dist', 'ab')
const beforeDir = join(abRoot, baseline.slice(0, 12))
if (!existsSync(join(beforeDir, 'shared', 'optics', 'tracer.ts'))) {
  rmSync(beforeDir, { recursive: true, force: true })
  mkdirSync(beforeDir, { recursive: true })
  const tar = execFileSync('git', ['archive', '--format=tar', baseline, 'shared'], { cwd: repoRoot, maxBuffer: 64 << 20 })
  execFileSync('tar', ['-x', '-C', beforeDir], { input: tar })
}
const before = await bundle(entryBefore(beforeDir), join(beforeDir, 'bundle'))
const today = await bundle(ENTRY_TODAY, join(abRoot, 'today'))

function cpuSeconds(): number {
  const u = process.cpuUsage()
  return (u.user + u.system) / 1e6
}
const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b)
  const i = q * (s.length - 1), lo = Math.floor(i), hi = Math.ceil(i)
  return s[lo]! + (s[hi]! - s[lo]!) * (i - lo)
}

console.log(`A/B fused loop: today (this tree) vs before issue 12 (${baseline.slice(0, 10)}), both bundled by esbuild, in-process on one thread; `
  + `${rays.toLocaleString('en-US')} rays (device + traced companion) per side per round, ${rounds} rounds alternating order; load average ${loadavg().map((x) => x.toFixed(2)).join(' ')}`)
for (const name of names) {
  const scenario = benchScenarios[name]!
  const runs = { today: today.prepare(scenario), before: before.prepare(scenario) }
  const sides = { today, before } as const
  const time = (k: 'today' | 'before', seed: number) => {
    const c0 = cpuSeconds()
    const t = sides[k].trace(runs[k], 0, rays, seed)
    const s = cpuSeconds() - c0
    return { raysPerSecond: rays / s, hasPlanar: t.planar !== null }
  }
  // Warm-up (JIT) on both sides, not counted.
  const w = [time('today', 1), time('before', 1)]
  if (w[0]!.hasPlanar !== w[1]!.hasPlanar) throw new Error(`${name}: one side traced the companion and the other did not`)
  const ratios: number[] = []
  const rate = { today: [] as number[], before: [] as number[] }
  for (let r = 0; r < rounds; r++) {
    const order = r % 2 === 0 ? (['today', 'before'] as const) : (['before', 'today'] as const)
    const got: Record<string, number> = {}
    for (const k of order) got[k] = time(k, 100 + r).raysPerSecond
    rate.today.push(got.today!)
    rate.before.push(got.before!)
    ratios.push(got.today! / got.before!)
  }
  const med = quantile(ratios, 0.5)
  const pct = (x: number) => `${x >= 1 ? '+' : ''}${((x - 1) * 100).toFixed(1)} %`
  console.log(`  ${name}: today ${Math.round(quantile(rate.today, 0.5)).toLocaleString('en-US')} rays/s, before ${Math.round(quantile(rate.before, 0.5)).toLocaleString('en-US')} `
    + `rays/s (medians, CPU time); today / before ×${med.toFixed(3)} (${pct(med)}), quartiles ×${quantile(ratios, 0.25).toFixed(3)}–×${quantile(ratios, 0.75).toFixed(3)}, `
    + `range ×${Math.min(...ratios).toFixed(3)}–×${Math.max(...ratios).toFixed(3)}: ${Math.abs(med - 1) <= 0.03 ? 'within' : 'NOT within'} 3 %`)
}
console.log(`load average after: ${loadavg().map((x) => x.toFixed(2)).join(' ')}`)
