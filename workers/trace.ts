// Piscina task entry: unpack a task (a scenario or already packed scenes, a ray range and a seed), call the core,
// return one transferable ArrayBuffer holding the device tally and the traced companion's, if any (read it with runTalliesFromBuffer from shared/optics).
// Stays thin; the physics lives in shared/optics.
// Abort: pass `abortFlag` (a SharedArrayBuffer of one Int32); when another thread stores a non-zero value, the
// task stops at the next 4096-ray boundary and returns a partial tally (tally[T_RAYS] < rayCount). Piscina's own
// AbortSignal (run(task, { signal })) ends a task from outside as well.
import { move } from 'piscina'
import { scenarioSchema } from '../shared/types/scenario'
import { type CompanionMethod, prepareRun, type RunScenes, runTalliesToBuffer, traceChunk } from '../shared/optics'

export interface TraceTask {
  /** A scenario (validated here with the shared schema) ... */
  scenario?: unknown
  /** ... or the packed scenes (from prepareRun). */
  scenes?: { device: Float64Array; planar: Float64Array | null }
  /** With `scenario`: the planar companion by quadrature (default, nothing traced for it) or traced. */
  companion?: CompanionMethod
  firstRay: number
  rayCount: number
  seed: number
  /** Encounters each stream of this chunk may spend (traceRange); rays past it are counted unresolved. */
  eventBudget?: number
  abortFlag?: SharedArrayBuffer
}

let cachedKey = ''
let cachedRun: RunScenes | null = null

function runFor(task: TraceTask): RunScenes {
  if (task.scenes) return task.scenes
  const key = `${task.companion ?? 'quadrature'}${JSON.stringify(task.scenario)}`
  if (key !== cachedKey || !cachedRun) {
    cachedRun = prepareRun(scenarioSchema.parse(task.scenario), { companion: task.companion })
    cachedKey = key
  }
  return cachedRun
}

export default function traceTask(task: TraceTask): ArrayBuffer {
  const run = runFor(task)
  const flag = task.abortFlag ? new Int32Array(task.abortFlag) : null
  const shouldStop = flag ? () => Atomics.load(flag, 0) !== 0 : undefined
  const t = traceChunk(run, task.firstRay, task.rayCount, task.seed, shouldStop, task.eventBudget ?? Infinity)
  return move(runTalliesToBuffer(t)) as unknown as ArrayBuffer
}
