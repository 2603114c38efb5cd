// Precision per second on the close-packed example (issue #15): the figure of merit 1/(σ²·t) of each headline
// figure, t the single-thread compute time spent on it (device rays, companion rays or quadrature), side by side.
//   npm run bench:precision [-- --rays 2000000]
// enhancement: extraction / flat-device extraction, with the companion traced (stream 1, as many rays as the
// device) or by quadrature (exact, σ from the device alone). On-axis luminance gain: the device's on-axis luminance
// (θ < 5°, binned) over the flat device's, the same two ways, and with the device's on-axis luminance from
// backward paths (reciprocal.ts, cos-weighted over the same 5° cone) over the exact flat device. Paired sweeps
// (common random numbers) are not built yet.
import { loadavg } from 'node:os'
import { parseArgs } from 'node:util'
import {
  createTally, flatCompanionOfScene, mergeTally, ON_AXIS_CONE_DEG, packScene, planChunks, prepareRun, STREAM_DEVICE, STREAM_PLANAR, summarize,
  reciprocalLuminance, traceRange, type Tally,
} from '../shared/optics'
import { scenarioSchema } from '../shared/types/scenario'
import { benchScenarios } from './scenarios'

const { values } = parseArgs({ options: { rays: { type: 'string', default: '2000000' } } })
const rays = Number(values.rays)
const sc = scenarioSchema.parse(benchScenarios['hex-hemisphere-close-packed'])
const run = prepareRun(sc, { companion: 'traced' })
console.log(`close-packed hexagonal hemispheres (10 µm, 1.7 | 1.5 | air, R 0.8), ${rays} rays, 1 thread; load average ${loadavg().map((x) => x.toFixed(2)).join(' ')}`)

function trace(scene: Float64Array, stream: number): { tally: Tally; seconds: number } {
  traceRange(scene, 0, 20_000, 99, createTally(), undefined, stream) // warm-up
  const tally = createTally()
  const t0 = performance.now()
  for (const [f, c] of planChunks(rays)) { const t = createTally(); traceRange(scene, f, c, 1, t, undefined, stream); mergeTally(tally, t) }
  return { tally, seconds: (performance.now() - t0) / 1000 }
}

const dev = trace(run.device, STREAM_DEVICE)
const pl = trace(run.planar!, STREAM_PLANAR)
const flatScene = packScene(sc, { planar: true })
for (let i = 0; i < 30; i++) flatCompanionOfScene(flatScene) // warm-up (JIT)
const qt: number[] = []
let flat = flatCompanionOfScene(flatScene)
for (let i = 0; i < 7; i++) { const t0 = performance.now(); flat = flatCompanionOfScene(flatScene); qt.push((performance.now() - t0) / 1000) }
const quadSeconds = qt.sort((a, b) => a - b)[3]!

const traced = summarize({ device: dev.tally, planar: pl.tally }, 1, sc.trace.fresnel)
const quad = summarize({ device: dev.tally, planar: null }, 1, sc.trace.fresnel, flat)
const fom = (sigma: number, t: number) => 1 / (sigma * sigma * t)
const row = (name: string, v: number, s: number, t: number) => `  ${name.padEnd(34)} ${v.toFixed(5)} ± ${s.toFixed(5)}   t ${t.toFixed(3)} s   1/(σ²t) ${fom(s, t).toExponential(3)} /s`

// on-axis luminance gain: device cone over flat cone (σ of the flat one 0 by quadrature)
const cone = (p: { luminanceRelative: number[] }) => {
  let m = 0
  for (let b = 0; b < ON_AXIS_CONE_DEG; b++) m += p.luminanceRelative[b]! * (Math.sin(((b + 1) * Math.PI) / 180) ** 2 - Math.sin((b * Math.PI) / 180) ** 2)
  return m / Math.sin((ON_AXIS_CONE_DEG * Math.PI) / 180) ** 2
}
const lamb = Math.sin((ON_AXIS_CONE_DEG * Math.PI) / 180) ** 2
let plAxis = 0
for (let b = 0; b < ON_AXIS_CONE_DEG; b++) plAxis += pl.tally[8 + b]!
const plAxisL = plAxis / rays / lamb, plAxisErr = Math.sqrt(plAxis * (1 - plAxis / rays)) / rays / lamb
const dL = traced.luminance.onAxisRelative, dLe = traced.luminance.onAxisRelativeStdErr
const gT = dL / plAxisL, gTe = gT * Math.hypot(dLe / dL, plAxisErr / plAxisL)
const qAxis = cone(flat)
const gQ = dL / qAxis, gQe = gQ * (dLe / dL)

console.log(`device trace ${dev.seconds.toFixed(3)} s (${Math.round(rays / dev.seconds)} rays/s); companion trace ${pl.seconds.toFixed(3)} s; quadrature ${(quadSeconds * 1000).toFixed(1)} ms (median of 7)`)
console.log('extraction')
console.log(row('device (binomial)', traced.extraction, traced.extractionStdErr, dev.seconds))
console.log('enhancement (extraction / flat device)')
console.log(row('traced companion', traced.enhancement, traced.enhancementStdErr, dev.seconds + pl.seconds))
console.log(row('quadrature companion', quad.enhancement, quad.enhancementStdErr, dev.seconds + quadSeconds))
const rE = fom(quad.enhancementStdErr, dev.seconds + quadSeconds) / fom(traced.enhancementStdErr, dev.seconds + pl.seconds)
console.log(`  figure of merit, quadrature / traced: ×${rE.toFixed(2)} (target ≥ 1.2)`)
console.log(`  flat device: traced ${traced.planar.extraction.toFixed(5)} ± ${traced.planar.extractionStdErr.toFixed(5)}, quadrature ${flat.extraction.toFixed(6)} (z ${((traced.planar.extraction - flat.extraction) / traced.planar.extractionStdErr).toFixed(2)})`)
console.log(`on-axis luminance gain (θ < ${ON_AXIS_CONE_DEG}°, device binned)`)
console.log(row('traced companion', gT, gTe, dev.seconds + pl.seconds))
console.log(row('quadrature companion', gQ, gQe, dev.seconds + quadSeconds))
console.log(`  figure of merit, quadrature / traced: ×${(fom(gQe, dev.seconds + quadSeconds) / fom(gTe, dev.seconds + pl.seconds)).toFixed(2)}`)
const paths = Math.max(10_000, Math.round(rays / 20))
reciprocalLuminance(run.device, { bandLoDeg: 0, bandHiDeg: ON_AXIS_CONE_DEG }, 5000, 7) // warm-up
const r0 = performance.now()
const rec = reciprocalLuminance(run.device, { bandLoDeg: 0, bandHiDeg: ON_AXIS_CONE_DEG }, paths, 1)
const recSeconds = (performance.now() - r0) / 1000
const gR = rec.relative / qAxis, gRe = rec.relativeStdErr / qAxis
console.log(row(`reciprocal (${paths} paths), quadrature`, gR, gRe, recSeconds + quadSeconds))
const rR = fom(gRe, recSeconds + quadSeconds) / fom(gTe, dev.seconds + pl.seconds)
console.log(`  figure of merit, reciprocal + quadrature / binned + traced: ×${rR.toFixed(1)} (target ≥ 30); vs binned + quadrature ×${(fom(gRe, recSeconds + quadSeconds) / fom(gQe, dev.seconds + quadSeconds)).toFixed(1)}`)
console.log(`  reciprocal − binned device on-axis luminance: z ${((rec.relative - dL) / Math.hypot(rec.relativeStdErr, dLe)).toFixed(2)}`)
console.log(`load average after: ${loadavg().map((x) => x.toFixed(2)).join(' ')}`)
