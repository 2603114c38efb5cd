// npm run bench:thinfilm: time to tabulate the reference green stack over the 81-wavelength grid (380–780 nm,
// 5 nm) with its 91-angle glass tables, on one core, cache bypassed. Target < 1 s. Figures depend on machine load.
import { loadavg } from 'node:os'
import { REFERENCE_GREEN_STACK, thinFilmSchema } from '../shared/types/thin-film'
import { computeThinFilmTable, DEFAULT_WAVELENGTHS_NM } from '../shared/optics/thinfilm'
import { computeThinFilmSource } from '../shared/optics/thinfilm/source'
import { thinFilmFlat } from '../shared/optics/thinfilm/flat'
import { scenarioSchema } from '../shared/types/scenario'

const stack = thinFilmSchema.parse(REFERENCE_GREEN_STACK)
const optics = { glassIndex: 1.5 }
console.log(`load average (1 min) at the start: ${loadavg()[0]!.toFixed(2)}`)
computeThinFilmTable(stack, DEFAULT_WAVELENGTHS_NM.slice(0, 10), optics) // warm-up for the JIT
const runs: number[] = []
let evaluations = 0
for (let i = 0; i < 5; i++) {
  const t0 = performance.now()
  const t = computeThinFilmTable(stack, DEFAULT_WAVELENGTHS_NM, optics)
  runs.push(performance.now() - t0)
  evaluations = t.points.reduce((a, p) => a + p.evaluations, 0)
}
runs.sort((a, b) => a - b)
console.log(`thin-film table, reference green stack, ${DEFAULT_WAVELENGTHS_NM.length} wavelengths × 91 glass angles: median ${runs[2]!.toFixed(0)} ms, best ${runs[0]!.toFixed(0)} ms (${evaluations} integrand evaluations; target < 1000 ms on one core)`)
// The ray source of a scenario whose spectrum spans 380–780 nm (81 nodes at 5 nm): per node the dipole integrals,
// the emission CDFs on 257 glass angles and the stack's r_s, r_p on 1025; then the exact flat companion.
const sc = scenarioSchema.parse({ emitter: { thinFilm: REFERENCE_GREEN_STACK, spectrum: { table: [[380, 1], [780, 1]] } }, substrate: { index: 1.5, thicknessUm: 700, absorptionPerMm: 0.1 }, lensArray: null, trace: { fresnel: 'polarized' } })
computeThinFilmSource(sc) // warm-up
const src: number[] = [], flat: number[] = []
let nodes = 0
for (let i = 0; i < 5; i++) {
  const t0 = performance.now()
  const s = computeThinFilmSource(sc)
  src.push(performance.now() - t0)
  nodes = s.nodes.length
  const t1 = performance.now()
  thinFilmFlat(sc, s)
  flat.push(performance.now() - t1)
}
src.sort((a, b) => a - b); flat.sort((a, b) => a - b)
console.log(`thin-film ray source, ${nodes} wavelength nodes (emission CDFs on 257 glass angles, r_s/r_p on 1025): median ${src[2]!.toFixed(0)} ms, best ${src[0]!.toFixed(0)} ms (target < 1000 ms on one core); exact flat companion: median ${flat[2]!.toFixed(0)} ms`)
console.log(`load average (1 min) at the end: ${loadavg()[0]!.toFixed(2)}`)
