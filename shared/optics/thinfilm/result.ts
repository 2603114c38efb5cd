// A thin-film scenario's result: the traced counts (rays that entered the glass) turned into fractions of ALL dipole
// power, the exact flat companion (flat.ts) as the enhancement's reference, and the thin-film block (Purcell factor,
// mode split, dissipation spectrum, glass emission). Traced fractions are scaled by the glass share G (source.ts),
// their σ likewise (G is exact). The power that never enters the glass is not traced: it is accounted exactly —
// waveguided in `losses.waveguided`; evanescent/plasmon, absorbed at emission and any top-medium share in
// `losses.stackAbsorbed` beside the traced light that came back down and was absorbed there — so extraction plus the
// losses sum to 1. Mode split per wavelength weighted over the spectrum as the rays are (weights S·F); F, q_eff,
// K(u) and the glass emission at the spectrum's peak.
import { DEFAULT_WAVELENGTH_NM, indexAt, type Scenario } from '../../types/scenario'
import type { Losses, ThinFilmResult, TraceResult } from '../../types/result'
import { materialAt } from '../../types/thin-film'
import { dissipationSpectrum, glassAngular, thinFilmAt } from './dipole'
import { FLAT_BINS, thinFilmFlat, type ThinFilmFlat } from './flat'
import { thinFilmSource, type ThinFilmSource } from './source'
import { hash53 } from './table'

/** The wavelength the thin-film block is given at: a line's, a Gaussian's peak, a table's highest row, or 550 nm. */
export function thinFilmPeakNm(sc: Scenario): number {
  const sp = sc.emitter.spectrum
  if (sp === undefined) return DEFAULT_WAVELENGTH_NM
  if ('wavelengthNm' in sp) return sp.wavelengthNm
  if ('peakNm' in sp) return sp.peakNm
  let best = sp.table[0]!
  for (const r of sp.table) if (r[1] > best[1]) best = r
  return best[0]
}

/** u samples of the dissipation chart: 0 to 2 (past the plasmon of common cathodes), midpoints (never u = 1 exactly). */
export const DISSIPATION_POINTS = 400
const DISSIPATION_U_MAX = 2

export interface ThinFilmExact {
  source: ThinFilmSource
  flat: ThinFilmFlat
  /** Exact fractions of all dipole power outside the glass (spectrum-weighted). */
  waveguided: number
  evanescent: number
  absorbed: number
  block: Omit<ThinFilmResult, 'modes'>
}

const cache = new Map<string, ThinFilmExact>()
const CACHE_ENTRIES = 16

/** Everything exact about a thin-film scenario (cached per stack, glass and Fresnel mode on this thread). */
export function thinFilmExact(sc: Scenario): ThinFilmExact {
  const source = thinFilmSource(sc)
  const key = `${source.key}-${hash53(JSON.stringify([sc.substrate.thicknessUm, sc.substrate.absorptionPerMm, sc.trace.fresnel]))}`
  const hit = cache.get(key)
  if (hit) return hit
  const flat = thinFilmFlat(sc, source)
  let waveguided = 0, evanescent = 0, absorbed = 0
  for (const n of source.nodes) {
    waveguided += n.weight * n.point.modes.waveguided
    evanescent += n.weight * n.point.modes.evanescent
    absorbed += n.weight * (n.point.modes.absorbed + n.point.modes.top)
  }
  const tf = source.stack
  const lam = thinFilmPeakNm(sc)
  const glassIndex = indexAt(sc.substrate.index, lam)
  const point = thinFilmAt(tf, lam, { glassIndex })
  const u = Array.from({ length: DISSIPATION_POINTS }, (_, i) => ((i + 0.5) * DISSIPATION_U_MAX) / DISSIPATION_POINTS)
  const K = dissipationSpectrum(tf, lam, { glassIndex }, u)
  const thetaDeg = Array.from({ length: 91 }, (_, i) => i)
  const g = glassAngular(tf, lam, { glassIndex }, thetaDeg.map((d) => (d * Math.PI) / 180), point.purcell.mixed)
  const ne = materialAt(tf.layers.find((l) => l.emitting)!.material, lam).n
  const out: ThinFilmExact = {
    source, flat, waveguided, evanescent, absorbed,
    block: {
      wavelengthNm: lam,
      purcellFactor: point.purcell.mixed,
      effectiveRadiativeEfficiency: point.effectiveRadiativeEfficiency,
      horizontalDipoleFraction: tf.horizontalDipoleFraction,
      dissipation: {
        u, teHorizontal: [...K.teH], tmHorizontal: [...K.tmH], tmVertical: [...K.tmV], mixed: [...K.mixed], uAir: 1 / ne, uGlass: glassIndex / ne,
      },
      glassEmission: { thetaDeg, s: [...g.s], p: [...g.p] },
    },
  }
  if (cache.size >= CACHE_ENTRIES) cache.delete(cache.keys().next().value!)
  cache.set(key, out)
  return out
}

const DEG = Math.PI / 180

/**
 * Rescales a summarised thin-film result (fractions per traced ray) to fractions of all dipole power, puts the
 * exact flat device in `planar` (method "quadrature") and the enhancement against it (σ from the device alone),
 * and fills `thinFilm`.
 */
export function applyThinFilm(r: TraceResult, sc: Scenario, stackAbsorbedRays: number): TraceResult {
  const X = thinFilmExact(sc)
  const G = X.source.glassShare
  const n = r.rays
  const sa = n > 0 ? stackAbsorbedRays / n : 0
  const saErr = n > 0 ? Math.sqrt((sa * (1 - sa)) / n) : 0
  const scaleLosses = (l: Losses, traced: number, exact: boolean): Losses => ({
    reflector: 0,
    substrate: l.substrate * G,
    waveguided: l.waveguided * G + (exact ? X.waveguided : 0),
    trapped: l.trapped * G,
    unresolved: l.unresolved * G,
    stackAbsorbed: traced * G + (exact ? X.evanescent + X.absorbed : 0),
  })
  const ext = r.extraction * G, extErr = r.extractionStdErr * G
  const mul = (a: number[]) => a.map((v) => v * G)
  const flat = X.flat
  const perSteradian: number[] = [], luminanceRelative: number[] = []
  for (let b = 0; b < FLAT_BINS; b++) {
    const c = flat.airBins[b]!
    perSteradian.push(c / (2 * Math.PI * (Math.cos(b * DEG) - Math.cos((b + 1) * DEG))))
    luminanceRelative.push(c / (Math.sin((b + 1) * DEG) ** 2 - Math.sin(b * DEG) ** 2))
  }
  const zeros = new Array<number>(FLAT_BINS).fill(0)
  const glass = G
  const pixel = r.pixel === null ? null : {
    ...r.pixel,
    extraction: r.pixel.extraction * G, extractionStdErr: r.pixel.extractionStdErr * G,
    onAxisRelative: r.pixel.onAxisRelative * G, onAxisRelativeStdErr: r.pixel.onAxisRelativeStdErr * G,
    planarOnAxisRelative: r.pixel.planarOnAxisRelative * G, planarOnAxisRelativeStdErr: r.pixel.planarOnAxisRelativeStdErr * G,
  }
  const mapped = r.intensity.map
  return {
    ...r,
    extraction: ext,
    extractionStdErr: extErr,
    losses: scaleLosses(r.losses, sa, true),
    lossesStdErr: { ...scaleLosses(r.lossesStdErr, saErr, false) },
    intensity: {
      ...r.intensity,
      perSteradian: mul(r.intensity.perSteradian), perSteradianStdErr: mul(r.intensity.perSteradianStdErr),
      map: { ...mapped, perSteradian: mul(mapped.perSteradian), perSteradianStdErr: mul(mapped.perSteradianStdErr) },
    },
    luminance: {
      ...r.luminance,
      relative: mul(r.luminance.relative), relativeStdErr: mul(r.luminance.relativeStdErr),
      onAxisRelative: r.luminance.onAxisRelative * G, onAxisRelativeStdErr: r.luminance.onAxisRelativeStdErr * G,
    },
    planar: {
      method: 'quadrature',
      extraction: flat.extraction,
      extractionStdErr: 0,
      losses: {
        reflector: 0, substrate: flat.substrate, waveguided: X.waveguided, trapped: flat.trapped, unresolved: 0,
        stackAbsorbed: flat.stackAbsorbed + X.evanescent + X.absorbed,
      },
      perSteradian, perSteradianStdErr: zeros,
      luminanceRelative, luminanceRelativeStdErr: zeros.slice(),
    },
    pixel,
    enhancement: flat.extraction > 0 ? ext / flat.extraction : NaN,
    enhancementStdErr: flat.extraction > 0 ? extErr / flat.extraction : NaN,
    thinFilm: {
      ...X.block,
      modes: {
        flat: {
          air: flat.extraction, glass: glass - flat.extraction, waveguided: X.waveguided, evanescent: X.evanescent, absorbed: X.absorbed,
          airStdErr: 0, glassStdErr: 0,
        },
        film: {
          air: ext, glass: glass - ext, waveguided: X.waveguided, evanescent: X.evanescent, absorbed: X.absorbed,
          airStdErr: extErr, glassStdErr: extErr,
        },
      },
    },
  }
}
