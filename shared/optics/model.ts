// The reference tracer: the readable model (steps.ts) run over a ray range into a tally, with an optional
// recorder of every ray's path (the browser preview uses it). Same arguments and the same tally as the fused
// traceRange (tracer.ts), bit for bit; slower, since it favours reading over speed.
import { createRay, resetRay } from './ray'
import { scoreColour, scoreExit } from './film'
import { launch, stackOf, traceRay, type RayRecorder } from './steps'
import { SOURCE_EXTENDED, type PackedScene } from './scene'
import { colourBinOf, hasColour, hasPanel, PT_EDGE, T_EVENTS, T_EXTRACTED, T_PIXEL_RAYS, T_RAYS, type Tally } from './tally'
import { END_EDGE, panelBlockOf, scoreSpot } from './panel'

export type { RayRecorder } from './steps'

/**
 * Traces rays [firstRay, firstRay + rayCount) of stream `streamId` into `tally` (counts added); returns rayCount.
 * `eventBudget` caps the encounters of the whole call, as in traceRange: a ray gets at most min(maxEvents, what is
 * left of the budget) and is cut short as unresolved beyond it.
 */
export function traceRangeModel(scene: PackedScene, firstRay: number, rayCount: number, seed: number, tally: Tally,
  streamId = 0, recorder?: RayRecorder, eventBudget = Infinity): number {
  const st = stackOf(scene)
  const ray = createRay()
  // colour counts only for a scene with a spectrum and a tally that has the block (createTally(true))
  const colour = st.spectralAt > 0 && hasColour(tally)
  // a finite panel's edge channel and detector counts go to the tally's panel block
  if (st.panelAt > 0 && !hasPanel(tally)) throw new Error('a finite panel scene needs a tally with the panel block: createTally(colour, true)')
  const pb = st.panelAt > 0 ? panelBlockOf(tally) : 0
  let spent = 0
  for (let r = 0; r < rayCount; r++) {
    resetRay(ray, seed, streamId, firstRay + r)
    if (recorder !== undefined) recorder.start(firstRay + r)
    launch(ray, st, recorder)
    const left = eventBudget - spent
    traceRay(ray, st, recorder, left < st.maxEvents ? left : st.maxEvents)
    spent += ray.events
    tally[T_EVENTS] = tally[T_EVENTS]! + ray.events
    const slot = ray.end === END_EDGE ? pb + PT_EDGE : ray.end
    tally[slot] = tally[slot]! + 1
    const bt = ray.end === T_EXTRACTED ? scoreExit(tally, ray.dx, ray.dy, ray.dz, ray.x + ray.ox, ray.y + ray.oy, st.source, st.sourceAUm, st.sourceBUm) : -1
    if (bt >= 0 && st.panelAt > 0) scoreSpot(tally, pb, scene, st.panelAt, ray.x + ray.ox, ray.y + ray.oy, ray.dz, bt)
    if (colour) scoreColour(tally, colourBinOf(ray.wavelengthNm), bt)
    if (recorder !== undefined) recorder.finish(ray)
  }
  tally[T_RAYS] = tally[T_RAYS]! + rayCount
  if (st.source !== SOURCE_EXTENDED) tally[T_PIXEL_RAYS] = tally[T_PIXEL_RAYS]! + rayCount
  return rayCount
}
