// Linked lens-geometry inputs: the user gives any two of base diameter D (or fill factor instead of D), sag h and
// radius of curvature Rc; the third (and the fill factor) follow. Pure: no Vue, so the unit tests call it directly.
// Formulas from shared/types/geometry.ts (spherical cap: Rc = (r² + h²)/2h; fill factor π/(2√3)·(D/p)² hexagonal,
// π/4·(D/p)² square). Lengths in µm.
import {
  diameterFromFillFactorUm, diameterFromRadiusAndSagUm, fillFactor, maxFillFactor, radiusOfCurvatureUm,
  sagFromRadiusUm, type LatticeKind,
} from '#shared/types/geometry'

/** The quantities a user can type. "diameter" and "fill" are one slot: fill factor is D given another way. */
export type LensField = 'diameter' | 'fill' | 'sag' | 'radius'

export interface LensLink {
  lattice: LatticeKind
  pitchUm: number
  diameterUm: number
  sagUm: number
  radiusUm: number
  fillFactor: number
  /** The two fields the user set last, newest first; the rest are derived from them. */
  given: [LensField, LensField]
  /** Why the given pair has no spherical cap (shown beside the fields); null when consistent. */
  problem: string | null
  /** The input the problem is about (its message goes under that field), null when it is about the pair. */
  problemField?: LensField | 'pitch' | null
}

function slot(f: LensField): 'd' | 'h' | 'r' {
  return f === 'diameter' || f === 'fill' ? 'd' : f === 'sag' ? 'h' : 'r'
}

function fmt(x: number): string {
  return String(Number(x.toPrecision(4)))
}

/** A consistent link state from a stored lens (D, h), with D and h as the given pair. */
export function linkFromLens(lattice: LatticeKind, pitchUm: number, diameterUm: number, sagUm: number): LensLink {
  return derive({ lattice, pitchUm, diameterUm, sagUm, radiusUm: NaN, fillFactor: NaN, given: ['sag', 'diameter'], problem: null })
}

/** Recomputes the derived quantities from the given pair (pitch and lattice as set). */
export function derive(s: LensLink): LensLink {
  const out: LensLink = { ...s, given: [...s.given] as [LensField, LensField], problem: null, problemField: null }
  // an entry that is empty, not a number, zero or negative derives nothing: the others show as unknown
  const bad = badEntry(out)
  if (bad) {
    out.problem = bad.message
    out.problemField = bad.field
    for (const f of ['diameter', 'fill', 'sag', 'radius'] as const) {
      if (!out.given.includes(f) && !(f === 'diameter' && out.given.includes('fill')) && !(f === 'fill' && out.given.includes('diameter'))) setField(out, f, NaN)
    }
    if (out.given.includes('diameter')) out.fillFactor = NaN
    if (out.given.includes('fill')) out.diameterUm = NaN
    return out
  }
  const slots = new Set(out.given.map(slot))
  const fillGiven = out.given.includes('fill')
  if (slots.has('d')) {
    if (fillGiven) {
      const max = maxFillFactor(out.lattice)
      if (out.fillFactor > max + 1e-12) out.problemField = 'fill'
      if (!(out.fillFactor > 0)) out.problem = 'Fill factor must be above 0.'
      else if (out.fillFactor > max + 1e-12) out.problem = `Fill factor ${fmt(out.fillFactor)} is above the ${out.lattice} maximum ${fmt(max)} (caps touching).`
      out.diameterUm = Math.min(diameterFromFillFactorUm(out.lattice, out.fillFactor, out.pitchUm), out.fillFactor <= max ? out.pitchUm : Infinity)
    }
    if (slots.has('h')) {
      out.radiusUm = radiusOfCurvatureUm(out.diameterUm, out.sagUm)
    } else {
      const h = sagFromRadiusUm(out.diameterUm, out.radiusUm)
      if (Number.isNaN(h)) {
        out.problem ??= `Radius of curvature ${fmt(out.radiusUm)} µm is below half the diameter (${fmt(out.diameterUm / 2)} µm): no spherical cap has this base.`
      } else out.sagUm = h
    }
  } else {
    // sag and radius given: the base follows; a cap taller than its radius would be more than a hemisphere
    if (out.sagUm > out.radiusUm * (1 + 1e-12)) {
      out.problem = `Sag ${fmt(out.sagUm)} µm is above the radius of curvature ${fmt(out.radiusUm)} µm: that would be more than a hemisphere.`
    }
    out.diameterUm = diameterFromRadiusAndSagUm(out.radiusUm, out.sagUm)
  }
  if (!fillGiven) out.fillFactor = fillFactor(out.lattice, out.diameterUm, out.pitchUm)
  if (!out.problem && out.diameterUm > out.pitchUm * (1 + 1e-12)) {
    out.problemField = out.given.includes('fill') ? 'fill' : 'diameter'
    out.problem = `Diameter ${fmt(out.diameterUm)} µm is above the pitch ${fmt(out.pitchUm)} µm: caps would overlap.`
  }
  return out
}

const FIELD_WORDS: Record<LensField | 'pitch', [string, string]> = {
  pitch: ['Pitch', ' µm'], diameter: ['Base diameter D', ' µm'], fill: ['Fill factor', ''], sag: ['Sag h', ' µm'], radius: ['Radius of curvature Rc', ' µm'],
}

function fieldValue(s: LensLink, f: LensField | 'pitch'): number {
  return f === 'pitch' ? s.pitchUm : f === 'diameter' ? s.diameterUm : f === 'fill' ? s.fillFactor : f === 'sag' ? s.sagUm : s.radiusUm
}

function setField(s: LensLink, f: LensField, v: number) {
  if (f === 'diameter') s.diameterUm = v
  else if (f === 'fill') s.fillFactor = v
  else if (f === 'sag') s.sagUm = v
  else s.radiusUm = v
}

/** The first of pitch and the given pair that is not a number above 0, worded for the user; null if none. */
function badEntry(s: LensLink): { field: LensField | 'pitch'; message: string } | null {
  for (const field of ['pitch', ...s.given] as const) {
    const v = fieldValue(s, field)
    const [name, unit] = FIELD_WORDS[field]
    if (typeof v !== 'number' || Number.isNaN(v)) return { field, message: `${name} is empty or not a number: enter a value above 0${unit}.` }
    if (!Number.isFinite(v)) return { field, message: `${name} must be a finite number.` }
    if (v <= 0) return { field, message: `${name} must be above 0${unit}: got ${fmt(v)}${unit}.` }
  }
  return null
}

/** The user typed `value` into `field`: it becomes the newest given field and the rest follow. */
export function editLens(s: LensLink, field: LensField | 'pitch', value: number): LensLink {
  const next: LensLink = { ...s, given: [...s.given] as [LensField, LensField] }
  if (field === 'pitch') {
    next.pitchUm = value
    return derive(next)
  }
  if (field === 'diameter') next.diameterUm = value
  else if (field === 'fill') next.fillFactor = value
  else if (field === 'sag') next.sagUm = value
  else next.radiusUm = value
  // newest first; a field of the same slot (D ↔ fill) replaces the older one, otherwise the oldest drops out
  const older = next.given.filter((f) => slot(f) !== slot(field))
  next.given = [field, older[0] ?? (slot(field) === 'h' ? 'diameter' : 'sag')]
  return derive(next)
}

/** Switches the lattice: the given pair stays (a given fill factor keeps its value, so D changes). */
export function setLattice(s: LensLink, lattice: LatticeKind): LensLink {
  return derive({ ...s, lattice })
}
