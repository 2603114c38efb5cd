// Lensfield simulate CLI: trace a scenario file on a piscina pool and print the figures (each with its unit and
// ± standard error), or with --json one JSON object on the last line of stdout. Exit 2 on a bad file, bad JSON or
// an invalid scenario (the field is named); exit 1 on an internal failure.
//   npm run simulate -- <scenario.json> [--rays N] [--seed S] [--threads T] [--json]
import { readFileSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { parseScenario } from '../shared/types/scenario'
import type { TraceResult } from '../shared/types/result'
import { traceOnPool } from './trace-pool'

const USAGE = 'usage: npm run simulate -- <scenario.json> [--rays N] [--seed S] [--threads T] [--json]'

function fail(msg: string, code = 2): never {
  process.stderr.write(`simulate: ${msg}\n`)
  process.exit(code)
}

function intArg(name: string, v: string | undefined, min: number, max: number): number {
  const n = Number(v)
  if (v === undefined || !Number.isInteger(n) || n < min || n > max) fail(`${name} must be an integer from ${min} to ${max}: got ${v ?? '(nothing)'}\n${USAGE}`)
  return n
}

function parseArgs(argv: string[]) {
  let file: string | undefined
  let rays: number | undefined, seed: number | undefined, threads: number | undefined
  let json = false
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!
    if (a === '--json') json = true
    else if (a === '--rays') rays = intArg('--rays', argv[++i], 1, 1e10)
    else if (a === '--seed') seed = intArg('--seed', argv[++i], 0, 0xffffffff)
    else if (a === '--threads') threads = intArg('--threads', argv[++i], 1, 256)
    else if (a === '--help' || a === '-h') { process.stdout.write(`${USAGE}\n`); process.exit(0) }
    else if (a.startsWith('--')) fail(`unknown option ${a}\n${USAGE}`)
    else if (file === undefined) file = a
    else fail(`more than one scenario file given (${file}, ${a})\n${USAGE}`)
  }
  if (file === undefined) fail(`no scenario file given\n${USAGE}`)
  return { file, rays, seed, threads, json }
}

function pm(v: number, e: number, digits = 4): string {
  return `${v.toFixed(digits)} ± ${e.toFixed(digits)}`
}

function pct(v: number, e: number): string {
  return `${(100 * v).toFixed(2)} % ± ${(100 * e).toFixed(2)} %`
}

function summaryText(r: TraceResult, threads: number, seconds: number): string {
  const L = r.losses, E = r.lossesStdErr
  const lines = [
    `rays                 ${r.rays} (seed ${r.seed}, ${threads} thread${threads > 1 ? 's' : ''}, ${seconds.toFixed(1)} s)${r.fresnel ? `, Fresnel ${r.fresnel}` : ''}`,
    `extraction           ${pct(r.extraction, r.extractionStdErr)} of emitted flux`,
    `planar extraction    ${pct(r.planar.extraction, r.planar.extractionStdErr)} of emitted flux`,
    `enhancement          ${pm(r.enhancement, r.enhancementStdErr, 3)} × planar`,
    `losses               reflector ${pct(L.reflector, E.reflector)}, substrate ${pct(L.substrate, E.substrate)},`,
    `                     waveguided ${pct(L.waveguided, E.waveguided)}, trapped ${pct(L.trapped, E.trapped)}, unresolved ${pct(L.unresolved, E.unresolved)}`,
    `on-axis luminance    ${pm(r.luminance.onAxisRelative, r.luminance.onAxisRelativeStdErr, 3)} × Lambertian of the emitted flux (θ < ${r.luminance.onAxisConeDeg}°)`,
    `half-luminance angle ${r.luminance.halfLuminanceAngleDeg === null ? 'none below 87.5°' : `${r.luminance.halfLuminanceAngleDeg.toFixed(1)}° ± ${(r.luminance.halfLuminanceAngleStdErrDeg ?? NaN).toFixed(1)}°`}`,
  ]
  if (r.pixel) {
    const p = r.pixel
    lines.push(
      `pixel footprint      extraction ${pct(p.extraction, p.extractionStdErr)}, on-axis luminance ${pm(p.onAxisRelative, p.onAxisRelativeStdErr, 3)} × Lambertian`,
      `                     planar ${pm(p.planarOnAxisRelative, p.planarOnAxisRelativeStdErr, 3)}, on-axis enhancement ${pm(p.onAxisEnhancement, p.onAxisEnhancementStdErr, 3)} ×`,
    )
  }
  if (r.colour) {
    const c = r.colour, f = r.planarColour
    lines.push(
      `colour (CIE 1931)    on axis x ${c.x[0]?.toFixed(4) ?? '—'}, y ${c.y[0]?.toFixed(4) ?? '—'}; largest Δu′v′ to 60° ${pm(c.maxDeltaUvTo60, c.maxDeltaUvTo60StdErr, 4)}${f ? ` (planar ${pm(f.maxDeltaUvTo60, f.maxDeltaUvTo60StdErr, 4)})` : ''}`,
      `photometry           on-axis ${pm(c.photopicOnAxisRelative, c.photopicOnAxisRelativeStdErr, 3)} × Lambertian (photopic), gain ${pm(r.photopicOnAxisGain ?? NaN, r.photopicOnAxisGainStdErr ?? NaN, 3)} × planar, efficacy ${pm(c.luminousEfficacyLmPerW, c.luminousEfficacyStdErrLmPerW, 1)} lm/W`,
    )
  }
  lines.push('intensity in air (1/sr per emitted ray, azimuth-averaged):')
  for (const th of [0, 10, 20, 30, 40, 50, 60, 70, 80]) {
    lines.push(`  θ ${String(th).padStart(2)}–${th + 1}°        ${pm(r.intensity.perSteradian[th]!, r.intensity.perSteradianStdErr[th]!, 4)} /sr   L/L_Lamb ${pm(r.luminance.relative[th]!, r.luminance.relativeStdErr[th]!, 3)}`)
  }
  return lines.join('\n')
}

async function main() {
  const args = parseArgs(process.argv.slice(2))
  let text: string
  try {
    text = readFileSync(args.file, 'utf8')
  } catch (e) {
    fail(`cannot read ${args.file}: ${(e as Error).message}`)
  }
  let data: unknown
  try {
    data = JSON.parse(text)
  } catch (e) {
    fail(`${args.file} is not valid JSON: ${(e as Error).message}`)
  }
  const parsed = parseScenario(data)
  if (!parsed.ok) fail(`${args.file} is not a valid scenario:\n  ${parsed.errors.join('\n  ')}`)
  const sc = parsed.scenario
  const rays = args.rays ?? sc.trace.rays
  const seed = args.seed ?? sc.trace.seed
  const threads = args.threads ?? Math.max(1, availableParallelism())
  const tty = process.stderr.isTTY === true
  const t0 = performance.now()
  let lastDraw = 0
  const { result } = await traceOnPool(sc, {
    rays, seed, threads,
    onProgress: tty
      ? (done, total) => {
          const now = performance.now()
          if (done < total && now - lastDraw < 100) return
          lastDraw = now
          const w = 30, f = Math.round((w * done) / total)
          process.stderr.write(`\r[${'#'.repeat(f)}${'.'.repeat(w - f)}] ${((100 * done) / total).toFixed(0).padStart(3)} % ${done}/${total} rays`)
          if (done === total) process.stderr.write('\n')
        }
      : undefined,
  })
  const seconds = (performance.now() - t0) / 1000
  if (args.json) process.stdout.write(`${JSON.stringify({ ...result, threads, seconds })}\n`)
  else process.stdout.write(`${summaryText(result, threads, seconds)}\n`)
}

main().catch((e) => fail(`internal error: ${(e as Error).stack ?? e}`, 1))
