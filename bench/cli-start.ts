// CLI start-up and whole-process thread scaling of `npm run simulate` (the compiled CLI, scripts/simulate.mjs).
//   npm run bench:cli [-- --rays 8000000 --repeat 7]
// Prints wall times (median and best of --repeat runs) of: the compiled CLI's --help and a 1-ray run (start-up:
// process start, bundle load, pool of 1 thread, summary); the same 1-ray run from TypeScript through tsx (what the
// script did before); then 1 and 2 threads on --rays rays of the close-packed example, whole process, and their
// ratio. The load average is printed before and after: on a shared machine the best run is the closer figure.
import { spawnSync } from 'node:child_process'
import { mkdirSync, writeFileSync } from 'node:fs'
import { loadavg } from 'node:os'
import { fileURLToPath } from 'node:url'
import { parseArgs } from 'node:util'
import { benchScenarios } from './scenarios'

const root = fileURLToPath(new URL('..', import.meta.url))
const { values } = parseArgs({ options: { rays: { type: 'string', default: '8000000' }, repeat: { type: 'string', default: '7' } } })
const rays = Number(values.rays), repeat = Number(values.repeat)
const dir = `${root}test-output/bench`
mkdirSync(dir, { recursive: true })
const file = `${dir}/cli-start.json`
writeFileSync(file, JSON.stringify(benchScenarios['hex-hemisphere-close-packed']))

/** Wall seconds of one run, and its CPU seconds (user + sys, all threads; bash's `time` reports the child's). */
function timed(cmd: string, args: string[]): { wall: number; cpu: number } {
  const quoted = [cmd, ...args].map((a) => `'${a}'`).join(' ')
  const t0 = performance.now()
  const r = spawnSync('bash', ['-c', `TIMEFORMAT='%U %S'; time ${quoted} > /dev/null 2>&1`], { cwd: root, encoding: 'utf8' })
  const wall = (performance.now() - t0) / 1000
  if (r.status !== 0) throw new Error(`${quoted} failed: ${r.stderr}`)
  const [u, sy] = r.stderr.trim().split(/\s+/).slice(-2).map(Number)
  return { wall, cpu: u! + sy! }
}
function series(n: number, cmd: string, args: string[]) {
  const runs = Array.from({ length: n }, () => timed(cmd, args))
  const w = stats(runs.map((r) => r.wall)), c = stats(runs.map((r) => r.cpu))
  return { median: w.median, best: w.best, cpu: c.median }
}
function stats(xs: number[]) {
  const s = [...xs].sort((a, b) => a - b)
  return { median: s[Math.floor(s.length / 2)]!, best: s[0]! }
}
const load = () => loadavg().map((x) => x.toFixed(2)).join(' ')
const fmt = (x: number) => `${x.toFixed(3)} s`

console.log(`load average (1, 5, 15 min) before: ${load()} on ${(await import('node:os')).availableParallelism()} cores`)
timed('node', ['scripts/simulate.mjs', '--help']) // builds dist/ when stale: not timed
const line = (name: string, r: ReturnType<typeof series>, note = '') =>
  console.log(`${name.padEnd(36)} wall median ${fmt(r.median)}, best ${fmt(r.best)}; CPU ${fmt(r.cpu)}${note}`)
line('node -e 0 (the floor)', series(repeat, 'node', ['-e', '0']))
line('compiled CLI --help', series(repeat, 'node', ['scripts/simulate.mjs', '--help']))
line('compiled CLI, 1 ray, 1 thread', series(repeat, 'node', ['scripts/simulate.mjs', file, '--rays', '1', '--threads', '1', '--json']), '   (target < 0.3 s)')
line('from TypeScript (tsx), 1 ray', series(Math.min(3, repeat), 'node', ['node_modules/.bin/tsx', 'scripts/simulate.ts', file, '--rays', '1', '--threads', '1', '--json']))
const t1 = series(2, 'node', ['scripts/simulate.mjs', file, '--rays', String(rays), '--threads', '1', '--json'])
const t2 = series(2, 'node', ['scripts/simulate.mjs', file, '--rays', String(rays), '--threads', '2', '--json'])
console.log(`${rays} rays, whole process         1 thread best ${fmt(t1.best)} (${Math.round(rays / t1.best)} rays/s), 2 threads best ${fmt(t2.best)} (${Math.round(rays / t2.best)} rays/s): ×${(t1.best / t2.best).toFixed(2)} (target ≥ 1.85)`)
console.log(`load average after: ${load()}`)
