// The finite panel's pure parts (shared/optics/panel.ts, tally.ts, scene.ts, run.ts): the edge hit, the packed
// block, the tally layouts and their buffers, chunk-order invariance, the panel's field-named messages and the
// result page's chart of the spot.
import { describe, expect, it } from 'vitest'
import {
  createTally, DETECTOR_LUMINANCE_METER, EDGE_POLISHED, hasColour, hasPanel, mergeRunTallies, P_COS_ACCEPT, P_DETECTOR, P_EDGE_KIND, P_EMIT_WIDTH_UM,
  P_HALF_HEIGHT_UM, P_HALF_WIDTH_UM, P_SPOT_RADIUS_UM, P_SPOT_X_UM, packScene, PANEL_TALLY_LENGTH, panelEdgeHit, planChunks, prepareRun, PT_EDGE,
  runTalliesFromBuffer, runTalliesToBuffer, S_PANEL_OFFSET, SPECTRAL_TALLY_LENGTH, summarize, T_RAYS, TALLY_LENGTH, traceChunk, widenTally,
} from '../../../shared/optics'
import { parseScenario, scenarioSchema, type ScenarioInput } from '../../../shared/types/scenario'
import { resultSchema } from '../../../shared/types/result'
import { spotLuminanceCsv, spotLuminanceOption } from '../../../app/utils/charts/panel'

const base: ScenarioInput = {
  emitter: { index: 1.7 }, reflector: { reflectance: 0.8 }, substrate: { index: 1.5, thicknessUm: 300 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 },
}
const meter = { kind: 'luminanceMeter' as const, spotCentreMm: [1, -0.5] as [number, number], spotDiameterMm: 2, acceptanceDeg: 20 }

describe('panelEdgeHit (plane geometry)', () => {
  const out = new Float64Array(2)
  it('finds the nearer edge along the lateral direction', () => {
    panelEdgeHit(0, 0, 1, 0, 10, 5, out)
    expect([out[0], out[1]]).toEqual([10, 1])
    panelEdgeHit(0, 0, 0.6, 0.8, 10, 5, out) // x edge at s = 10/0.6 = 16.7, y edge at 5/0.8 = 6.25
    expect(out[0]).toBeCloseTo(6.25, 12)
    expect(out[1]).toBe(2)
    panelEdgeHit(-9, 0, -1, 0, 10, 5, out)
    expect([out[0], out[1]]).toEqual([1, 1])
  })
  it('a vertical ray meets no edge; a point a rounding error outside meets it at s = 0', () => {
    panelEdgeHit(3, 1, 0, 0, 10, 5, out)
    expect(out[0]).toBe(Infinity)
    panelEdgeHit(10 + 1e-12, 0, 1, 0, 10, 5, out)
    expect([out[0], out[1]]).toEqual([0, 1])
    // a corner: the x edge first, the y edge follows at s = 0
    panelEdgeHit(9, 4, 1, 1, 10, 5, out)
    expect([out[0], out[1]]).toEqual([1, 1])
  })
})

describe('packing and tallies', () => {
  it('packs the panel block in µm with the meter\'s spot and cos α; the infinite array has none', () => {
    const s = packScene(scenarioSchema.parse({
      ...base, panel: { widthMm: 20, heightMm: 10, emitting: { widthMm: 8, heightMm: 4 }, edges: 'polished', detector: { ...meter, acceptanceDeg: 2 } },
    }))
    const at = s[S_PANEL_OFFSET]!
    expect(at).toBeGreaterThan(0)
    expect([s[at + P_HALF_WIDTH_UM], s[at + P_HALF_HEIGHT_UM], s[at + P_EMIT_WIDTH_UM]]).toEqual([10_000, 5000, 8000])
    expect([s[at + P_EDGE_KIND], s[at + P_DETECTOR], s[at + P_SPOT_X_UM], s[at + P_SPOT_RADIUS_UM]])
      .toEqual([EDGE_POLISHED, DETECTOR_LUMINANCE_METER, 1000, 1000])
    expect(s[at + P_COS_ACCEPT]).toBeCloseTo(Math.cos((2 * Math.PI) / 180), 15)
    expect(packScene(scenarioSchema.parse(base))[S_PANEL_OFFSET]).toBe(0)
    // the flat companion keeps the panel and its detector
    expect(packScene(scenarioSchema.parse({ ...base, panel: { widthMm: 20, heightMm: 10 } }), { planar: true })[S_PANEL_OFFSET]).toBeGreaterThan(0)
  })

  it('four tally layouts, told apart by length; widening keeps the colour block and moves the panel block to the end', () => {
    const lens = [createTally(), createTally(true), createTally(false, true), createTally(true, true)].map((t) => t.length)
    expect(lens).toEqual([TALLY_LENGTH, SPECTRAL_TALLY_LENGTH, TALLY_LENGTH + PANEL_TALLY_LENGTH, SPECTRAL_TALLY_LENGTH + PANEL_TALLY_LENGTH])
    const p = createTally(false, true)
    p[0] = 5; p[p.length - PANEL_TALLY_LENGTH + PT_EDGE] = 3
    const w = widenTally(p, createTally(true, true))
    expect(hasColour(w) && hasPanel(w)).toBe(true)
    expect(w[0]).toBe(5)
    expect(w[w.length - PANEL_TALLY_LENGTH + PT_EDGE]).toBe(3)
    for (const colour of [false, true]) {
      const t = { device: createTally(colour, true), planar: createTally(colour, true) }
      t.device[7] = 11; t.planar[9] = 13
      const back = runTalliesFromBuffer(runTalliesToBuffer(t))
      expect([back.device[7], back.planar![9], back.device.length]).toEqual([11, 13, t.device.length])
    }
  })

  it('chunks merged in any order give the same tallies as one pass (seed 9): the result is the same for any worker count', () => {
    const sc = scenarioSchema.parse({ ...base, panel: { widthMm: 4, heightMm: 4, edges: 'polished', detector: meter } })
    const run = prepareRun(sc)
    expect(run.planar).not.toBeNull() // the companion is traced over the same panel
    const whole = traceChunk(run, 0, 3000, 9)
    const parts = planChunks(3000, 700).map(([f, c]) => traceChunk(run, f, c, 9)).reverse()
    const total = { device: createTally(), planar: createTally() }
    for (const p of parts) mergeRunTallies(total, p)
    expect(Array.from(total.device)).toEqual(Array.from(whole.device))
    expect(Array.from(total.planar!)).toEqual(Array.from(whole.planar!))
    expect(total.device[T_RAYS]).toBe(3000)
    // and the summary parses as a result, says what it measured, and carries the edge channel with σ
    const r = resultSchema.parse(summarize(total, 9, 'averaged', null, sc))
    expect(r.panel!.measures).toMatch(/Luminance meter: a 2 mm spot at \(1, -0.5\) mm/)
    expect(r.losses.edge).toBe(r.panel!.edge.value)
    expect(r.lossesStdErr.edge).toBeGreaterThan(0)
    expect(r.panel!.gain.value).toBeGreaterThan(0)
    expect(spotLuminanceOption(r.panel!)).not.toBeNull()
    expect(spotLuminanceCsv(r.panel!).rows).toHaveLength(90)
  })
})

describe('panel validation: field-named messages', () => {
  const msgs = (panel: unknown, over: Partial<ScenarioInput> = {}) => {
    const r = parseScenario({ ...base, ...over, panel })
    return r.ok ? [] : r.errors
  }
  it('names the field, the limit and the value', () => {
    expect(msgs({ widthMm: 0, heightMm: 10 })).toContain('Panel width must be above 0 mm: got 0 mm')
    expect(msgs({ widthMm: 10, heightMm: 10, emitting: { widthMm: 12, heightMm: 5 } })).toContain('Emitting width must be at most the panel width 10 mm: got 12 mm')
    expect(msgs({ widthMm: 10, heightMm: 10, detector: { ...meter, spotCentreMm: [6, 0] } })[0]).toMatch(/^Spot centre must lie on the panel/)
    expect(msgs({ widthMm: 10, heightMm: 10, detector: { ...meter, acceptanceDeg: 40 } })).toContain('Acceptance half-angle must be at most 30 °: got 40 °')
    expect(msgs({ widthMm: 10, heightMm: 10, detector: { kind: 'sphere', includeEdges: true } })).toContain('Sphere collects the edges needs polished edges: no light leaves through absorbing edges')
    expect(msgs({ widthMm: 10, heightMm: 10 }, { emitter: { index: 1.7, source: { shape: 'disc', radiusUm: 5 } } })[0]).toMatch(/^Source area must be extended on a finite panel/)
    expect(msgs({ widthMm: 10, heightMm: 10, edges: 'frosted' })[0]).toMatch(/^Glass edges must be one of "absorbing", "mirrored", "ground", "polished"/)
    expect(msgs({ widthMm: 10, heightMm: 10 })).toEqual([])
  })
})
