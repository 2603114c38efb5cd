// A whole run: the lens device and its planar companion (the same stack without lenses) traced with the same ray
// count on independent streams (stream 0 and stream 1 of the same seed), so the enhancement's standard error
// follows (σE/E)² = (σ1/η1)² + (σ2/η2)². A planar scenario is its own companion (enhancement exactly 1, σ 0).
// By default (companion 'quadrature') the companion is not traced at all but computed exactly (flat-quadrature.ts)
// whenever that applies (an extended source, not a thin-film source): no companion rays, σ of the enhancement from
// the device alone, σE/E = σ1/η1. 'traced' keeps the traced companion as the cross-check.
// Rays are cut into fixed chunks of CHUNK_RAYS whose boundaries do not depend on the thread count; tallies hold
// integer counts, so any merge order gives bitwise identical results. summarize turns counts into the result.
import { fresnelModeOf, scenarioSchema, type FresnelMode, type Panel, type Scenario } from '../types/scenario'
import { applyThinFilm } from './thinfilm/result'
import { tracedPerRay } from '../types/ray-limits'
import type { Losses, PanelResult, TraceResult } from '../types/result'
import { DEFAULT_ACCEPT_DEG } from './panel'
import { flatCompanion, type FlatCompanion } from './flat-quadrature'
import { packScene, type PackedScene, S_HAS_LENS, S_PANEL_OFFSET, S_SPECTRAL_OFFSET } from './scene'
import { traceRange } from './tracer'
import { colourOf } from './colour'
import {
  createTally, hasPanel, mergeTally, PANEL_TALLY_LENGTH, PT_EDGE, PT_SPOT, PT_SPOT_ACCEPTED, PT_SPOT_THETA,
  SPECTRAL_TALLY_LENGTH, widenTally, PHI_BINS, PIXEL_AXIS_BINS, TALLY_LENGTH, T_PIXEL_AXIS, T_PIXEL_EXTRACTED,
  T_PIXEL_RAYS, T_EXTRACTED, T_MAP, T_RAYS, T_REFLECTOR, T_SUBSTRATE, T_THETA, T_TRAPPED,
  T_STACK_ABSORBED, T_UNRESOLVED, T_WAVEGUIDED, TALLY_LENGTHS, THETA_BINS, type Tally,
} from './tally'

export const CHUNK_RAYS = 1 << 16
export const STREAM_DEVICE = 0
export const STREAM_PLANAR = 1
/** On-axis luminance is estimated over this cone (deg): a compromise between bias (<0.2 % for smooth profiles) and noise. */
export const ON_AXIS_CONE_DEG = 5

/** How the planar companion is obtained: exactly by quadrature (default; when it applies) or traced. */
export type CompanionMethod = 'quadrature' | 'traced'

export interface RunScenes {
  device: PackedScene
  /** The traced companion's scene; null when the device itself is planar or the companion is computed by quadrature. */
  planar: PackedScene | null
}

export interface RunTallies {
  device: Tally
  planar: Tally | null
}

/** Whether a run of this scenario traces its planar companion (doubling its rays): lenses, and no quadrature for it. */
export function tracesCompanion(sc: Scenario, companion: CompanionMethod = 'quadrature'): boolean {
  // The default rule is the one the ray accounting charges (shared/types/ray-limits.ts): a finite pixel, or a sheet
  // emitter with a spectrum (the flat device's colour comes from its counts), traces its companion.
  return companion === 'traced' ? sc.lensArray !== null : tracedPerRay(sc) === 2
}

export function prepareRun(sc: Scenario, opts: { companion?: CompanionMethod } = {}): RunScenes {
  const device = packScene(sc)
  return { device, planar: device[S_HAS_LENS] && tracesCompanion(sc, opts.companion) ? packScene(sc, { planar: true }) : null }
}

/**
 * The sheet emitter's companion by quadrature, which summarize needs besides the tallies, when the tallies hold no
 * traced companion and the device has lenses; else null. A thin-film stack's exact companion is applied inside
 * summarize from the scenario (thinfilm/result.ts), so it gets null here too. Takes a scenario as stored (validated
 * again here); null if it is not valid.
 */
export function companionFor(scenario: unknown, t: RunTallies): FlatCompanion | null {
  if (t.planar) return null
  const parsed = scenarioSchema.safeParse(scenario)
  if (!parsed.success || parsed.data.lensArray === null || parsed.data.emitter.thinFilm !== undefined) return null
  return flatCompanion(parsed.data)
}

/**
 * The scenario summarize needs besides the counts (a thin-film stack's exact parts), from a stored scenario; undefined
 * for the sheet emitter, whose result follows from the counts (and the quadrature companion) alone.
 */
export function summaryScenario(stored: unknown): Scenario | undefined {
  const tf = (stored as { emitter?: { thinFilm?: unknown } } | null)?.emitter?.thinFilm
  // a finite panel's reading needs the panel and its detector (sizes, spot) besides the counts
  const panel = (stored as { panel?: unknown } | null)?.panel
  if (tf === undefined && panel === undefined) return undefined
  const parsed = scenarioSchema.safeParse(stored)
  return parsed.success ? parsed.data : undefined
}

/** summarize for a cell as stored: its Fresnel mode, the quadrature companion and the thin-film parts from its scenario. */
export function summarizeStored(t: RunTallies, seed: number, storedScenario: unknown): TraceResult {
  return summarize(t, seed, fresnelModeOf(storedScenario), companionFor(storedScenario, t), summaryScenario(storedScenario))
}

/** Fixed chunk plan for `rays` rays: [firstRay, rayCount] pairs. */
export function planChunks(rays: number, chunkRays = CHUNK_RAYS): Array<[number, number]> {
  const out: Array<[number, number]> = []
  for (let first = 0; first < rays; first += chunkRays) out.push([first, Math.min(chunkRays, rays - first)])
  return out
}

/**
 * Traces one ray range of the device and of its planar companion. `eventBudget` (encounters) applies to each of
 * the two streams separately (see traceRange).
 */
export function traceChunk(run: RunScenes, firstRay: number, rayCount: number, seed: number, shouldStop?: () => boolean,
  eventBudget = Infinity): RunTallies {
  // a scene with a spectrum gets the colour block (tally.ts); otherwise the tally is as before
  const colour = run.device[S_SPECTRAL_OFFSET]! > 0
  const panel = run.device[S_PANEL_OFFSET]! > 0 // a finite panel's scenes get the panel block (edge channel, detector)
  const device = createTally(colour, panel)
  traceRange(run.device, firstRay, rayCount, seed, device, shouldStop, STREAM_DEVICE, eventBudget)
  let planar: Tally | null = null
  if (run.planar) {
    planar = createTally(colour, panel)
    traceRange(run.planar, firstRay, rayCount, seed, planar, shouldStop, STREAM_PLANAR, eventBudget)
  }
  return { device, planar }
}

/**
 * Adds `src` into `dst`. A total made with createTally() takes chunks with the colour block: its tallies are
 * widened in place of the fields (dst.device / dst.planar become new arrays, the colour block starting at zero).
 */
export function mergeRunTallies(dst: RunTallies, src: RunTallies): RunTallies {
  dst.device = mergeTally(widenTally(dst.device, src.device), src.device)
  if (dst.planar && src.planar) dst.planar = mergeTally(widenTally(dst.planar, src.planar), src.planar)
  return dst
}

/** Single-thread convenience: the whole scenario (ray count and seed from the scenario unless given). */
export function traceScenario(sc: Scenario, opts: { rays?: number; seed?: number; companion?: CompanionMethod } = {}): TraceResult {
  const rays = opts.rays ?? sc.trace.rays
  const seed = opts.seed ?? sc.trace.seed
  const run = prepareRun(sc, { companion: opts.companion })
  const colour = run.device[S_SPECTRAL_OFFSET]! > 0, panel = run.device[S_PANEL_OFFSET]! > 0
  const total: RunTallies = { device: createTally(colour, panel), planar: run.planar ? createTally(colour, panel) : null }
  for (const [first, count] of planChunks(rays)) mergeRunTallies(total, traceChunk(run, first, count, seed))
  return summarize(total, seed, sc.trace.fresnel, run.planar || !sc.lensArray ? null : companionFor(sc, total), sc)
}

function binomialErr(count: number, n: number): number {
  if (n <= 0) return 0
  const p = count / n
  return Math.sqrt((p * (1 - p)) / n)
}

function lossesOf(t: Tally): { v: Losses; e: Losses } {
  const n = t[T_RAYS]!
  const f = (i: number) => (n > 0 ? t[i]! / n : 0)
  const e = (i: number) => binomialErr(t[i]!, n)
  const v: Losses = { reflector: f(T_REFLECTOR), substrate: f(T_SUBSTRATE), waveguided: f(T_WAVEGUIDED), trapped: f(T_TRAPPED), unresolved: f(T_UNRESOLVED) }
  const err: Losses = { reflector: e(T_REFLECTOR), substrate: e(T_SUBSTRATE), waveguided: e(T_WAVEGUIDED), trapped: e(T_TRAPPED), unresolved: e(T_UNRESOLVED) }
  // a finite panel's edge channel (the tally's panel block)
  if (hasPanel(t)) { const i = t.length - PANEL_TALLY_LENGTH + PT_EDGE; v.edge = f(i); err.edge = e(i) }
  return { v, e: err }
}

const DEG = Math.PI / 180

/**
 * Counts → result. Intensity per launched ray: I = c/(N·ΔΩ), ΔΩ = 2π(cosθa − cosθb) (map: ΔΩ/PHI_BINS), σ from
 * the binomial √(c(1 − c/N))/(N·ΔΩ). Relative luminance per bin: the bin's fraction of launched rays over what a
 * Lambertian source emitting exactly the launched flux (I = cosθ/π) puts there, (c/N)/(sin²θb − sin²θa); this is
 * π·I(θ)/cosθ at 1° resolution, and equals 1 for such a source.
 */
/** Azimuth-averaged intensity (1/sr per launched ray) and relative luminance per 1° bin, each with its σ. */
function angularProfile(t: Tally) {
  const n = t[T_RAYS]!
  const perSteradian: number[] = [], perSteradianStdErr: number[] = [], luminanceRelative: number[] = [], luminanceRelativeStdErr: number[] = []
  for (let b = 0; b < THETA_BINS; b++) {
    const ta = b * DEG, tb = (b + 1) * DEG
    const dOmega = 2 * Math.PI * (Math.cos(ta) - Math.cos(tb))
    const lamb = Math.sin(tb) ** 2 - Math.sin(ta) ** 2
    const c = t[T_THETA + b]!
    const cErr = n > 0 ? Math.sqrt(c * (1 - c / n)) : 0
    perSteradian.push(n > 0 ? c / (n * dOmega) : 0)
    perSteradianStdErr.push(n > 0 ? cErr / (n * dOmega) : 0)
    luminanceRelative.push(n > 0 ? c / n / lamb : 0)
    luminanceRelativeStdErr.push(n > 0 ? cErr / n / lamb : 0)
  }
  return { perSteradian, perSteradianStdErr, luminanceRelative, luminanceRelativeStdErr }
}

/**
 * `fresnel`: the Fresnel mode that made the tallies (recorded in the result; absent for results made before it was
 * kept). `flat`: the sheet emitter's companion by quadrature (flatCompanion / companionFor) when the tallies hold no
 * traced one; without either, the device is its own companion (a planar design). `scenario`: needed for a thin-film
 * source (thinfilm/result.ts: fractions of all dipole power, the exact flat companion, the thin-film block); ignored
 * otherwise.
 */
export function summarize(t: RunTallies, seed: number, fresnel?: FresnelMode, flat?: FlatCompanion | null, scenario?: Scenario): TraceResult {
  const r = summarizeCounts(t, seed, fresnel, flat)
  if (scenario?.panel !== undefined && hasPanel(t.device)) r.panel = panelReading(t, scenario.panel)
  // tallies stored before the stack slot existed are one slot shorter: no stack-absorbed rays
  if (scenario?.emitter.thinFilm !== undefined) return applyThinFilm(r, scenario, t.device[T_STACK_ABSORBED] ?? 0)
  return r
}

function summarizeCounts(t: RunTallies, seed: number, fresnel?: FresnelMode, flat?: FlatCompanion | null): TraceResult {
  const d = t.device
  const n = d[T_RAYS]!
  const ext = n > 0 ? d[T_EXTRACTED]! / n : 0
  const extErr = binomialErr(d[T_EXTRACTED]!, n)
  const L = lossesOf(d)
  const thetaCentersDeg: number[] = [], perSr: number[] = [], perSrErr: number[] = [], lum: number[] = [], lumErr: number[] = []
  const mapI: number[] = [], mapErr: number[] = []
  let axisCount = 0
  for (let b = 0; b < THETA_BINS; b++) {
    const ta = b * DEG, tb = (b + 1) * DEG
    const dOmega = 2 * Math.PI * (Math.cos(ta) - Math.cos(tb))
    const c = d[T_THETA + b]!
    thetaCentersDeg.push(b + 0.5)
    const cErr = n > 0 ? Math.sqrt(c * (1 - c / n)) : 0
    perSr.push(n > 0 ? c / (n * dOmega) : 0)
    perSrErr.push(n > 0 ? cErr / (n * dOmega) : 0)
    const lamb = Math.sin(tb) ** 2 - Math.sin(ta) ** 2
    lum.push(n > 0 ? c / n / lamb : 0)
    lumErr.push(n > 0 ? cErr / n / lamb : 0)
    if (b < ON_AXIS_CONE_DEG) axisCount += c
    const dOm = dOmega / PHI_BINS
    for (let p = 0; p < PHI_BINS; p++) {
      const cm = d[T_MAP + b * PHI_BINS + p]!
      mapI.push(n > 0 ? cm / (n * dOm) : 0)
      mapErr.push(n > 0 ? Math.sqrt(cm * (1 - cm / n)) / (n * dOm) : 0)
    }
  }
  const axisLamb = Math.sin(ON_AXIS_CONE_DEG * DEG) ** 2
  const onAxis = n > 0 ? axisCount / n / axisLamb : 0
  const onAxisErr = n > 0 ? Math.sqrt(axisCount * (1 - axisCount / n)) / n / axisLamb : 0
  // Half-luminance angle: luminance pooled over a sliding 5° window (bins b−2..b+2, the Lambertian share of the
  // same window as reference), so single 1° bins near the axis, whose solid angle is tiny, cannot trigger it by
  // noise; the window at b = 2 is the on-axis cone itself. First window at or below half the on-axis value,
  // linear between window centres.
  // σ by the delta method: σθ = √(σ_window² + (σ_axis/2)²)/|dL/dθ|, the slope taken from the two windows
  // bracketing the crossing (per degree).
  let half: number | null = null, halfErr: number | null = null
  if (onAxis > 0) {
    const target = 0.5 * onAxis
    let prev = onAxis
    for (let b = 2; b <= THETA_BINS - 3; b++) {
      let c = 0
      for (let k = b - 2; k <= b + 2; k++) c += d[T_THETA + k]!
      const lamb = Math.sin((b + 3) * DEG) ** 2 - Math.sin((b - 2) * DEG) ** 2
      const lw = c / n / lamb
      if (lw <= target) {
        half = b - 0.5 + (prev - target) / (prev - lw)
        const sw = binomialErr(c, n) / lamb
        halfErr = Math.hypot(sw, 0.5 * onAxisErr) / (prev - lw)
        break
      }
      prev = lw
    }
  }
  // finite pixel: light leaving within the pixel's footprint, device vs planar companion
  let pixel: TraceResult['pixel'] = null
  if (d[T_PIXEL_RAYS]! > 0) {
    const p = t.planar ?? d
    const np = p[T_RAYS]!
    const lamb = Math.sin(PIXEL_AXIS_BINS * DEG) ** 2
    const fr = (c: number, m: number) => (m > 0 ? c / m : 0)
    const axD = fr(d[T_PIXEL_AXIS]!, n) / lamb, axDe = binomialErr(d[T_PIXEL_AXIS]!, n) / lamb
    const axP = fr(p[T_PIXEL_AXIS]!, np) / lamb, axPe = binomialErr(p[T_PIXEL_AXIS]!, np) / lamb
    const same = p === d
    const ratio = axP > 0 ? axD / axP : NaN
    pixel = {
      extraction: fr(d[T_PIXEL_EXTRACTED]!, n),
      extractionStdErr: binomialErr(d[T_PIXEL_EXTRACTED]!, n),
      onAxisRelative: axD,
      onAxisRelativeStdErr: axDe,
      planarOnAxisRelative: axP,
      planarOnAxisRelativeStdErr: axPe,
      onAxisEnhancement: same ? 1 : ratio,
      onAxisEnhancementStdErr: same ? 0 : axD > 0 && axP > 0 ? ratio * Math.sqrt((axDe / axD) ** 2 + (axPe / axP) ** 2) : NaN,
    }
  }
  let planarExt = ext, planarErr = extErr, planarLosses = L.v
  let enh = 1, enhErr = 0
  let planarBlock: TraceResult['planar'] | null = null
  if (!t.planar && flat) {
    planarBlock = flat
    enh = flat.extraction > 0 ? ext / flat.extraction : NaN
    enhErr = flat.extraction > 0 && ext > 0 ? enh * (extErr / ext) : NaN
  } else if (t.planar) {
    const p = t.planar
    const np = p[T_RAYS]!
    planarExt = np > 0 ? p[T_EXTRACTED]! / np : 0
    planarErr = binomialErr(p[T_EXTRACTED]!, np)
    planarLosses = lossesOf(p).v
    enh = planarExt > 0 ? ext / planarExt : NaN
    enhErr = planarExt > 0 && ext > 0 ? enh * Math.sqrt((extErr / ext) ** 2 + (planarErr / planarExt) ** 2) : NaN
  }
  return {
    rays: n,
    seed,
    ...(fresnel !== undefined ? { fresnel } : {}),
    extraction: ext,
    extractionStdErr: extErr,
    losses: L.v,
    lossesStdErr: L.e,
    intensity: {
      thetaBinWidthDeg: 1,
      thetaCentersDeg,
      perSteradian: perSr,
      perSteradianStdErr: perSrErr,
      map: { thetaBins: THETA_BINS, phiBins: PHI_BINS, phiBinWidthDeg: 360 / PHI_BINS, perSteradian: mapI, perSteradianStdErr: mapErr },
    },
    luminance: {
      relative: lum,
      relativeStdErr: lumErr,
      onAxisRelative: onAxis,
      onAxisRelativeStdErr: onAxisErr,
      onAxisConeDeg: ON_AXIS_CONE_DEG,
      halfLuminanceAngleDeg: half,
      halfLuminanceAngleStdErrDeg: halfErr,
    },
    // The companion's own angular profile, so a result page overlays the flat device of this very stack.
    planar: planarBlock ?? { method: 'traced', extraction: planarExt, extractionStdErr: planarErr, losses: planarLosses, ...angularProfile(t.planar ?? d) },
    pixel,
    enhancement: enh,
    enhancementStdErr: enhErr,
    ...colourFields(t, planarBlock != null),
  }
}

/** a/b with σ from (σ/g)² = (σa/a)² + (σb/b)²; null while b is 0 (no ratio yet), σ null while a is 0 too. */
const ratioOf = (a: number, ae: number, b: number, be: number, same: boolean) => {
  if (same) return { value: 1, stdErr: 0 }
  if (!(b > 0)) return { value: null, stdErr: null }
  const g = a / b
  return { value: g, stdErr: a > 0 ? g * Math.sqrt((ae / a) ** 2 + (be / b) ** 2) : null }
}

/**
 * A finite panel's reading (panel.ts): the detector's figure for the device and its traced companion (same panel,
 * same detector; for a planar design the device itself), the edge channel, and the spot's angular profile.
 * Sphere: (front [+ edge exits]) / N. Spot detectors: relative luminance (c/N)/(A_spot/A_emit)/(sin²θb − sin²θa), the
 * on-axis figure over θ < acceptance (the meter's cone, counted exactly: dz ≥ cos α; the goniometer's 5° cone from its
 * 1° bins, as the infinite run's on-axis luminance).
 */
function panelReading(t: RunTallies, p: Panel): PanelResult {
  const d = t.device, c = t.planar ?? d, same = c === d
  const at = (x: Tally) => x.length - PANEL_TALLY_LENGTH
  const n = d[T_RAYS]!, nc = c[T_RAYS]!
  const det = p.detector
  const emitW = p.emitting?.widthMm ?? p.widthMm, emitH = p.emitting?.heightMm ?? p.heightMm
  const fr = (x: number, m: number) => (m > 0 ? x / m : 0)
  const edge = (x: Tally) => ({ value: fr(x[at(x) + PT_EDGE]!, x[T_RAYS]!), stdErr: binomialErr(x[at(x) + PT_EDGE]!, x[T_RAYS]!) })
  const accDeg = det.kind === 'luminanceMeter' ? det.acceptanceDeg : DEFAULT_ACCEPT_DEG
  let measured: PanelResult['measured'], planarMeasured: PanelResult['planarMeasured'], measures: string
  let spot: PanelResult['spot'] = null
  if (det.kind === 'sphere') {
    const withEdges = det.includeEdges && p.edges === 'polished'
    const reading = (x: Tally) => {
      const k = x[T_EXTRACTED]! + (withEdges ? x[at(x) + PT_EDGE]! : 0)
      return { value: fr(k, x[T_RAYS]!), stdErr: binomialErr(k, x[T_RAYS]!) }
    }
    const m = reading(d)
    measured = { ...m, unit: '%' }
    planarMeasured = reading(c)
    measures = `Integrating sphere: all light leaving the front face${withEdges ? ' and the polished edges' : ''} of the ${p.widthMm} × ${p.heightMm} mm panel, as a share of the light emitted.`
  } else {
    const areaFraction = (Math.PI * (det.spotDiameterMm / 2) ** 2) / (emitW * emitH)
    const prof = (x: Tally) => {
      const m = x[T_RAYS]!
      const lum: number[] = [], lumE: number[] = [], perSr: number[] = [], perSrE: number[] = []
      for (let b = 0; b < THETA_BINS; b++) {
        const ta = b * DEG, tb = (b + 1) * DEG
        const k = x[at(x) + PT_SPOT_THETA + b]!
        const kE = m > 0 ? Math.sqrt(k * (1 - k / m)) : 0
        const dOmega = 2 * Math.PI * (Math.cos(ta) - Math.cos(tb)), lamb = (Math.sin(tb) ** 2 - Math.sin(ta) ** 2) * areaFraction
        perSr.push(m > 0 ? k / (m * dOmega) : 0); perSrE.push(m > 0 ? kE / (m * dOmega) : 0)
        lum.push(m > 0 ? k / m / lamb : 0); lumE.push(m > 0 ? kE / m / lamb : 0)
      }
      return { lum, lumE, perSr, perSrE }
    }
    const pd = prof(d), pc = prof(c)
    spot = {
      areaFraction, extraction: fr(d[at(d) + PT_SPOT]!, n), extractionStdErr: binomialErr(d[at(d) + PT_SPOT]!, n),
      perSteradian: pd.perSr, perSteradianStdErr: pd.perSrE, luminanceRelative: pd.lum, luminanceRelativeStdErr: pd.lumE,
      planarLuminanceRelative: pc.lum, planarLuminanceRelativeStdErr: pc.lumE,
    }
    const lambAxis = Math.sin(accDeg * DEG) ** 2 * areaFraction
    const onAxis = (x: Tally) => {
      let k = 0
      if (det.kind === 'luminanceMeter') k = x[at(x) + PT_SPOT_ACCEPTED]!
      else for (let b = 0; b < DEFAULT_ACCEPT_DEG; b++) k += x[at(x) + PT_SPOT_THETA + b]!
      return { value: fr(k, x[T_RAYS]!) / lambAxis, stdErr: binomialErr(k, x[T_RAYS]!) / lambAxis }
    }
    measured = { ...onAxis(d), unit: '× Lamb.' }
    planarMeasured = onAxis(c)
    const where = `a ${det.spotDiameterMm} mm spot at (${det.spotCentreMm[0]}, ${det.spotCentreMm[1]}) mm of the ${p.widthMm} × ${p.heightMm} mm panel`
    measures = det.kind === 'goniometer'
      ? `Goniometer with a field stop: light leaving the front face inside ${where}, by angle; the figure is its on-axis luminance (θ < ${DEFAULT_ACCEPT_DEG}°).`
      : `Luminance meter: ${where}, acceptance half-angle ${det.acceptanceDeg}° about the normal.`
  }
  return {
    widthMm: p.widthMm, heightMm: p.heightMm, emittingWidthMm: emitW, emittingHeightMm: emitH, edges: p.edges,
    detector: {
      kind: det.kind, acceptanceDeg: accDeg,
      ...(det.kind === 'sphere' ? { includeEdges: det.includeEdges } : { spotCentreMm: det.spotCentreMm, spotDiameterMm: det.spotDiameterMm }),
    },
    measures, measured, planarMeasured,
    gain: ratioOf(measured.value, measured.stdErr, planarMeasured.value, planarMeasured.stdErr, same || nc === 0),
    edge: edge(d), planarEdge: edge(c),
    spot,
  }
}

/**
 * Colour over angle of the device and its companion (colour.ts), present only when the tallies carry the colour
 * block; photopicOnAxisGain = device over companion photopic on-axis luminance, σ as for `enhancement`
 * (independent streams), exactly 1 with σ 0 for a planar device.
 */
function colourFields(t: RunTallies, exactCompanion = false): Pick<TraceResult, 'colour' | 'planarColour' | 'photopicOnAxisGain' | 'photopicOnAxisGainStdErr'> {
  const colour = colourOf(t.device)
  if (!colour) return {}
  // A companion by quadrature carries no colour counts (runs with a spectrum trace theirs: tracesCompanion).
  if (!t.planar && exactCompanion) return { colour, planarColour: null, photopicOnAxisGain: null, photopicOnAxisGainStdErr: null }
  if (!t.planar) return { colour, planarColour: colour, photopicOnAxisGain: 1, photopicOnAxisGainStdErr: 0 }
  const planarColour = colourOf(t.planar)
  const a = colour.photopicOnAxisRelative, ae = colour.photopicOnAxisRelativeStdErr
  const b = planarColour?.photopicOnAxisRelative ?? 0, be = planarColour?.photopicOnAxisRelativeStdErr ?? 0
  const gain = b > 0 ? a / b : NaN
  return {
    colour,
    planarColour,
    photopicOnAxisGain: gain,
    photopicOnAxisGainStdErr: a > 0 && b > 0 ? gain * Math.sqrt((ae / a) ** 2 + (be / b) ** 2) : NaN,
  }
}

/**
 * One ArrayBuffer (transferable) holding the device tally, then the planar companion's when there is one. Both have
 * the same layout, with or without the colour block; the four possible lengths (1 or 2 × TALLY_LENGTH or
 * SPECTRAL_TALLY_LENGTH) are all different, so the length alone says which.
 */
export function runTalliesToBuffer(t: RunTallies): ArrayBuffer {
  const L = t.device.length
  const all = new Float64Array(t.planar ? 2 * L : L)
  all.set(t.device, 0)
  if (t.planar) all.set(t.planar, L)
  return all.buffer
}

export function runTalliesFromBuffer(buf: ArrayBuffer | ArrayBufferLike): RunTallies {
  const all = new Float64Array(buf)
  for (const L of TALLY_LENGTHS) {
    if (all.length === L) return { device: all.subarray(0, L), planar: null }
    if (all.length === 2 * L) return { device: all.subarray(0, L), planar: all.subarray(L) }
  }
  throw new Error(`run buffer has ${all.length} numbers, expected 1 or 2 × ${TALLY_LENGTH} (or × ${SPECTRAL_TALLY_LENGTH} with colour, × ${TALLY_LENGTHS[2]} or ${TALLY_LENGTHS[3]} for a finite panel)`)
}
