// Lensfield simulate CLI: trace a scenario file on a piscina pool and print the figures (each with its unit and
// ± standard error), or with --json one JSON object on the last line of stdout. Exit 2 on a bad file, bad JSON or
// an invalid scenario (the field is named); exit 1 on an internal failure.
//   npm run simulate -- <scenario.json> [--rays N] [--seed S] [--threads T] [--companion quadrature|traced] [--directions 0,30,60] [--json]
//   --directions: reciprocal luminance at these θ (deg, φ = 0), min(rays, 100 000) backward paths each (extended source)
import { readFileSync } from 'node:fs'
import { availableParallelism } from 'node:os'
import { parseArgs as parseCliArgs } from 'node:util'
import { parseScenario } from '../shared/types/scenario'
import { tableRefsOf } from '../shared/types/table-refs'
import type { TraceResult } from '../shared/types/result'
import { packScene, reciprocalDirections } from '../shared/optics'
import { traceOnPool } from './trace-pool'

const USAGE = 'usage: npm run simulate -- <scenario.json> [--rays N] [--seed S] [--threads T] [--companion quadrature|traced] [--directions 0,30,60] [--json]'
const CLI_OPTIONS = {
  rays: { type: 'string' },
  seed: { type: 'string' },
  threads: { type: 'string' },
  companion: { type: 'string' },
  directions: { type: 'string' },
  json: { type: 'boolean' },
  help: { type: 'boolean', short: 'h' },
} as const

function fail(msg: string, code = 2): never {
  process.stderr.write(`simulate: ${msg}\n`)
  process.exit(code)
}

function intArg(name: string, v: string | undefined, min: number, max: number): number {
  const n = Number(v)
  if (v === undefined || !Number.isInteger(n) || n < min || n > max) fail(`${name} must be an integer from ${min} to ${max}: got ${v ?? '(nothing)'}\n${USAGE}`)
  return n
}

/** Whole-number flags and their ranges. */
const INT_FLAGS = { rays: [1, 1e10], seed: [0, 0xffffffff], threads: [1, 256] } as const
type IntFlag = keyof typeof INT_FLAGS
const isIntFlag = (name: string): name is IntFlag => Object.hasOwn(INT_FLAGS, name)

/** The command line (node:util parseArgs); every refusal names the flag and repeats the usage. */
function readArgs(argv: string[]) {
  let parsed: { values: { [K in IntFlag]?: string } & { companion?: string, directions?: string, json?: boolean, help?: boolean }, positionals: string[] }
  try {
    parsed = parseCliArgs({ args: argv, options: CLI_OPTIONS, allowPositionals: true, strict: true })
  } catch (e) {
    const err = e as Error & { code?: string }
    const flag = /'(-{1,2}[A-Za-z][\w-]*)/.exec(err.message)?.[1] ?? ''
    if (err.code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION') fail(`unknown option ${flag}\n${USAGE}`)
    // A number flag without its value, or with a value that starts with '-' (parseArgs will not take "--seed -1").
    const name = flag.replace(/^-+/, '')
    if (err.code === 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE' && isIntFlag(name)) {
      const at = argv.indexOf(flag)
      intArg(flag, at >= 0 ? argv[at + 1] : undefined, ...INT_FLAGS[name])
    }
    fail(`${err.message.split('\n')[0]}\n${USAGE}`)
  }
  const { values, positionals } = parsed
  if (values.help) { process.stdout.write(`${USAGE}\n`); process.exit(0) }
  if (positionals.length > 1) fail(`more than one scenario file given (${positionals.join(', ')})\n${USAGE}`)
  const file = positionals[0]
  if (file === undefined) fail(`no scenario file given\n${USAGE}`)
  const int = (name: IntFlag) => (values[name] === undefined ? undefined : intArg(`--${name}`, values[name], ...INT_FLAGS[name]))
  let companion: 'quadrature' | 'traced' | undefined
  if (values.companion !== undefined) {
    const v = values.companion
    if (v !== 'quadrature' && v !== 'traced') fail(`--companion must be quadrature or traced: got ${v || '(nothing)'}\n${USAGE}`)
    companion = v
  }
  let directions: number[] | undefined
  if (values.directions !== undefined) {
    const v = values.directions
    directions = v.split(',').map(Number)
    if (v === '' || directions.some((d) => !Number.isFinite(d) || d < 0 || d >= 90)) fail(`--directions must be viewing angles θ in degrees from 0 to below 90, comma-separated: got ${v || '(nothing)'}\n${USAGE}`)
  }
  return { file, rays: int('rays'), seed: int('seed'), threads: int('threads'), json: values.json === true, companion, directions }
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
    `planar extraction    ${pct(r.planar.extraction, r.planar.extractionStdErr)} of emitted flux${r.planar.method === 'quadrature' ? ' (quadrature, exact)' : ''}`,
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
  if (r.panel) {
    const p = r.panel, reading = (v: number, e: number) => (p.measured.unit === '%' ? pct(v, e) : `${pm(v, e, 3)} × Lambertian`)
    lines.push(
      `measured             ${p.measures}`,
      `                     ${reading(p.measured.value, p.measured.stdErr)}; flat device ${reading(p.planarMeasured.value, p.planarMeasured.stdErr)}; gain ${pm(p.gain.value ?? NaN, p.gain.stdErr ?? NaN, 3)} ×`,
      `panel edges          ${p.edges}: ${pct(p.edge.value, p.edge.stdErr)} of emitted flux ends there (flat device ${pct(p.planarEdge.value, p.planarEdge.stdErr)})`,
    )
  }
  for (const d of r.luminance.directions ?? []) {
    lines.push(`reciprocal luminance θ ${String(d.thetaDeg).padStart(2)}°, φ ${d.phiDeg}°: ${pm(d.relative, d.relativeStdErr, 4)} × Lambertian of the emitted flux`)
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
  const args = readArgs(process.argv.slice(2))
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
  const refs = tableRefsOf(data)
  if (refs.length) fail(`${args.file}: ${refs.map((r) => r.field.words).join(', ')} ${refs.length === 1 ? 'refers' : 'refer'} to uploaded tables by tableId, which only the server resolves; give the rows inline ({ "table": [[nm, …], …] }) here`)
  const parsed = parseScenario(data)
  if (!parsed.ok) fail(`${args.file} is not a valid scenario:\n  ${parsed.errors.join('\n  ')}`)
  const sc = parsed.scenario
  if (args.directions && sc.emitter.source.shape !== 'extended') fail('--directions needs an extended source: reciprocal luminance is the film average, a pixel footprint is not')
  if (args.directions && sc.panel) fail('--directions is for the infinite array: a finite panel is read by its detector (panel.detector in the scenario)')
  const rays = args.rays ?? sc.trace.rays
  const seed = args.seed ?? sc.trace.seed
  const threads = args.threads ?? Math.max(1, availableParallelism())
  const tty = process.stderr.isTTY === true
  const t0 = performance.now()
  let lastDraw = 0
  const { result } = await traceOnPool(sc, {
    rays, seed, threads, companion: args.companion,
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
  if (args.directions) {
    result.luminance.directions = reciprocalDirections(packScene(sc), args.directions.map((thetaDeg) => ({ thetaDeg, phiDeg: 0 })),
      Math.min(rays, 100_000), seed)
  }
  const seconds = (performance.now() - t0) / 1000
  if (args.json) process.stdout.write(`${JSON.stringify({ ...result, threads, seconds })}\n`)
  else process.stdout.write(`${summaryText(result, threads, seconds)}\n`)
}

main().catch((e) => fail(`internal error: ${(e as Error).stack ?? e}`, 1))
