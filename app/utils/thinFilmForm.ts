// The editor's layer-stack logic, kept out of the components so it can be tested without a browser: switching a
// design between the sheet emitter and the OLED layer stack (`emitter.thinFilm`, which replaces the reflector and
// sets the emitter index from the emitting layer), the layer-table edits, the stack's validation with
// thinFilmSchema's own messages by field, and the sweep axes a stack offers (per-layer thickness in nm).
import { thinFilmSchema, type ThinFilmInput } from '#shared/types/thin-film'

export interface StackLayer { name?: string; thicknessNm: number; material: { n: number; k: number }; emitting?: boolean }
export interface StackValue {
  layers: StackLayer[]
  cathode: { material: { n: number; k: number } }
  emitterPositionNm: number
  horizontalDipoleFraction?: number
  radiativeEfficiency?: number
}

/** The parts of a scenario (draft) that switching the source touches. */
export interface SourceParts {
  emitter: { index?: unknown; thinFilm?: StackValue }
  reflector?: { reflectance: number; diffuseFraction: number }
}

/** The reflector a design gets back when it returns from the stack to the sheet emitter (the sheet presets' mirror). */
export const DEFAULT_SHEET_REFLECTOR = { reflectance: 0.8, diffuseFraction: 0 } as const

/** Whether a scenario (draft) uses the layer stack as its source. */
export function usesStack(scenario: { emitter?: { thinFilm?: unknown } } | null | undefined): boolean {
  return !!scenario?.emitter?.thinFilm
}

/** The emitting layer's index (the first marked one), or -1. */
export function emittingIndex(tf: StackValue): number {
  return tf.layers.findIndex((l) => l.emitting)
}

/** The emitter index n the scenario takes from the stack: the emitting layer's n, when there is one with a valid n. */
export function stackEmitterIndex(tf: StackValue): number | undefined {
  const e = tf.layers.filter((l) => l.emitting)
  if (e.length !== 1) return undefined
  const n = e[0]!.material.n
  return Number.isFinite(n) ? n : undefined
}

/**
 * Puts a stack into a scenario draft in place: `emitter.thinFilm` set, `reflector` removed (the stack's own
 * cathode reflects), `emitter.index` from the emitting layer when it has a usable n. Returns the reflector it
 * removed (undefined if there was none), so switching back can restore it.
 */
export function applyStack(draft: SourceParts, tf: StackValue): { reflectance: number; diffuseFraction: number } | undefined {
  const removed = draft.reflector ?? undefined
  delete draft.reflector
  draft.emitter.thinFilm = tf
  const n = stackEmitterIndex(tf)
  if (n !== undefined) draft.emitter.index = n
  return removed
}

/** Back to the sheet emitter in place: no `emitter.thinFilm`, a reflector again (the one given, or the default). */
export function applySheet(draft: SourceParts, reflector?: { reflectance: number; diffuseFraction: number }): void {
  delete draft.emitter.thinFilm
  draft.reflector = { ...(reflector ?? DEFAULT_SHEET_REFLECTOR) }
}

/**
 * A deep copy of a stack field by field. Not structuredClone: the editor's stack is a Vue reactive proxy, which
 * structuredClone refuses; and not JSON: an emptied field holds NaN, which must stay NaN (the schema names it).
 */
export function cloneStack(tf: StackValue): StackValue {
  return {
    ...tf,
    layers: tf.layers.map((l) => ({ ...l, material: { ...l.material } })),
    cathode: { ...tf.cathode, material: { ...tf.cathode.material } },
  }
}

/** A plain copy of a stack with the schema's defaults filled in where the input leaves them out. */
export function stackFromInput(input: ThinFilmInput): StackValue {
  const c = cloneStack(input as StackValue)
  c.horizontalDipoleFraction ??= 2 / 3
  c.radiativeEfficiency ??= 1
  return c
}

// ---- layer table edits (each returns a new stack; the input is left alone) ----

const copy = cloneStack

/** A new transport-like layer after row `at` (or at the end): 20 nm of n = 1.75, not emitting. */
export function addLayer(tf: StackValue, at = tf.layers.length - 1): StackValue {
  const c = copy(tf)
  c.layers.splice(at + 1, 0, { name: `Layer ${c.layers.length + 1}`, thicknessNm: 20, material: { n: 1.75, k: 0 } })
  return c
}

/** A copy of row `at` below it, every field included (an emitting row's copy emits too: the table then says so). */
export function duplicateLayer(tf: StackValue, at: number): StackValue {
  const c = copy(tf)
  const l = c.layers[at]
  if (!l) return c
  c.layers.splice(at + 1, 0, { ...l, material: { ...l.material }, ...(l.name ? { name: `${l.name} copy`.slice(0, 40) } : {}) })
  return c
}

export function removeLayer(tf: StackValue, at: number): StackValue {
  const c = copy(tf)
  c.layers.splice(at, 1)
  return c
}

/** Moves row `at` by `by` (−1 towards the glass, +1 towards the cathode); out of range changes nothing. */
export function moveLayer(tf: StackValue, at: number, by: -1 | 1): StackValue {
  const c = copy(tf)
  const to = at + by
  if (at < 0 || at >= c.layers.length || to < 0 || to >= c.layers.length) return c
  const [l] = c.layers.splice(at, 1)
  c.layers.splice(to, 0, l!)
  return c
}

/** Marks row `at` as the only emitting layer; the emitter position is kept (the schema says if it no longer fits). */
export function setEmitting(tf: StackValue, at: number): StackValue {
  const c = copy(tf)
  c.layers.forEach((l, i) => { if (i === at) l.emitting = true; else delete l.emitting })
  return c
}

export function updateLayer(tf: StackValue, at: number, patch: Partial<Omit<StackLayer, 'material'>> & { n?: number; k?: number }): StackValue {
  const c = copy(tf)
  const l = c.layers[at]
  if (!l) return c
  const { n, k, ...rest } = patch
  Object.assign(l, rest)
  if (n !== undefined) l.material.n = n
  if (k !== undefined) l.material.k = k
  return c
}

// ---- validation ----

/** The schema's field keys as the form labels them (the messages start with the key). */
const KEY_WORDS: Record<string, string> = {
  thicknessNm: 'Thickness',
  emitterPositionNm: 'Emitter position',
  horizontalDipoleFraction: 'Horizontal dipole fraction',
  radiativeEfficiency: 'Radiative efficiency q',
}

function layerName(tf: StackValue, i: number): string {
  const nm = tf.layers[i]?.name?.trim()
  return nm ? `layer ${i + 1} (${nm})` : `layer ${i + 1}`
}

/**
 * thinFilmSchema's message for the form: the leading field key in the form's words ("thicknessNm must be …" →
 * "Thickness must be …"), and layer numbers as the table shows them (row 1 = next to the glass) with their names.
 */
export function formMessage(message: string, tf: StackValue): string {
  let m = message.replace(/^(thicknessNm|emitterPositionNm|horizontalDipoleFraction|radiativeEfficiency)\b/, (k) => KEY_WORDS[k] ?? k)
  // a schema that counts layers from 0 says "(layers 2 and 3)": → "(layer 3 (EML) and layer 4 (EML copy))". Only
  // that exact form is rewritten; a message that already counts from the glass ("layers 3, 4, counted from the
  // glass") is left as it is.
  m = m.replace(/\(layers (\d+) and (\d+)\)/, (_, a: string, b: string) => `(${layerName(tf, Number(a))} and ${layerName(tf, Number(b))})`)
  return m.charAt(0).toUpperCase() + m.slice(1)
}

export interface StackCheck {
  ok: boolean
  /** path inside the stack ("layers.2.thicknessNm", "emitterPositionNm", "layers") → the message beside that field */
  byPath: Record<string, string>
  /** every message once, layer fields prefixed with the layer ("Layer 3 (EML): Thickness must be …") */
  all: string[]
}

/** Validates a stack with thinFilmSchema: the same rules (and words) the server applies to `emitter.thinFilm`. */
export function checkStack(tf: StackValue): StackCheck {
  const r = thinFilmSchema.safeParse(tf)
  if (r.success) return { ok: true, byPath: {}, all: [] }
  const byPath: Record<string, string> = {}
  const all: string[] = []
  for (const iss of r.error.issues) {
    const path = iss.path.map(String)
    // a non-number reaches zod as NaN from an emptied field: the field's own message says it, in its words
    const msg = formMessage(iss.message, tf)
    const key = path.join('.')
    byPath[key] ??= msg
    const row = path[0] === 'layers' && path.length > 1 ? Number(path[1]) : null
    const where = row !== null ? `${layerName(tf, row).replace(/^l/, 'L')}: ` : path[0] === 'cathode' ? 'Cathode: ' : ''
    const line = `${where}${msg}`
    if (!all.includes(line)) all.push(line)
  }
  return { ok: false, byPath, all }
}

// ---- sweep axes ----

export interface StackAxisOption { parameter: string; label: string; unit: string }

/** The scenario path of layer i's thickness, as a sweep axis names it. */
export const layerThicknessPath = (i: number) => `emitter.thinFilm.layers[${i}].thicknessNm`
const LAYER_PATH = /^emitter\.thinFilm\.layers\[(\d+)\]\.thicknessNm$/

/** Sweep axes a stack offers: each layer's thickness by its name ("ETL thickness (nm)"), then the emitter's place and orientation. */
export function stackAxisOptions(tf: StackValue | null | undefined): StackAxisOption[] {
  if (!tf) return []
  return [
    ...tf.layers.map((l, i) => ({ parameter: layerThicknessPath(i), label: `${l.name?.trim() || `Layer ${i + 1}`} thickness`, unit: 'nm' })),
    { parameter: 'emitter.thinFilm.emitterPositionNm', label: 'Emitter position in its layer', unit: 'nm' },
    { parameter: 'emitter.thinFilm.horizontalDipoleFraction', label: 'Horizontal dipole fraction', unit: '' },
  ]
}

/** A sweep axis's label and unit with the stack's layer names ("ETL thickness", nm); null if it is no stack axis. */
export function stackAxisLabel(parameter: string, tf: StackValue | null | undefined): { label: string; unit: string } | null {
  const m = LAYER_PATH.exec(parameter)
  if (m) {
    const i = Number(m[1])
    const nm = tf?.layers[i]?.name?.trim()
    return { label: `${nm || `Layer ${i + 1}`} thickness`, unit: 'nm' }
  }
  return stackAxisOptions(tf ?? { layers: [], cathode: { material: { n: 1, k: 0 } }, emitterPositionNm: 0 }).find((o) => o.parameter === parameter) ?? null
}

/**
 * The axis a stack sweep starts from: the layer above the emitting one (the electron-transport layer), 20–260 nm in
 * 20 nm steps, long enough for the first and second cavity maxima (about λ/(2n) ≈ 160 nm apart at 550 nm, n 1.75).
 */
export function defaultStackAxis(tf: StackValue): { parameter: string; start: number; stop: number; steps: number } {
  const e = emittingIndex(tf)
  const i = e >= 0 && e + 1 < tf.layers.length ? e + 1 : tf.layers.length - 1
  return { parameter: layerThicknessPath(i), start: 20, stop: 260, steps: 13 }
}
