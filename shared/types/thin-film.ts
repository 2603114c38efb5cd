// The OLED's own layer stack as the emitter: the contract for a coherent thin-film source. Layers are listed from
// the glass upward; thicknesses and the emitter position in nm; a material is a complex index n + ik (a constant
// pair or an n,k table over wavelength). Used as `emitter.thinFilm` in the scenario (shared/types/scenario.ts).
import { z } from 'zod'

/** Most layers between the glass and the cathode (the tabulation cost grows with it; real stacks have ≤ 15). */
export const MAX_THIN_FILM_LAYERS = 30
/** Thickest layer accepted: 10 µm. Beyond that a layer is no longer a coherent thin film at visible wavelengths. */
export const MAX_THIN_FILM_LAYER_NM = 10_000

const nValue = z.number({ message: 'refractive index n must be a number' }).positive('refractive index n must be above 0').max(10, 'refractive index n must be at most 10')
const kValue = z.number({ message: 'extinction coefficient k must be a number' }).min(0, 'extinction coefficient k must not be negative (a negative k would be optical gain)').max(20, 'extinction coefficient k must be at most 20')

/**
 * A layer's (or the cathode's) complex index n + ik: a constant pair, or an n,k table [[nm, n, k], ...] (linear
 * between rows, clamped at the ends; the scenario checks that it covers the spectrum). k defaults to 0.
 */
export const opticalMaterialSchema = z
  .object({
    n: nValue.optional(),
    k: kValue.default(0),
    table: z
      .array(z.tuple([z.number().min(200, 'wavelength must be at least 200 nm').max(2500, 'wavelength must be at most 2500 nm'), nValue, kValue]))
      .min(2, 'needs at least 2 rows (nm, n, k)')
      .max(5000)
      .optional(),
  })
  .superRefine((m, ctx) => {
    if (m.table !== undefined) {
      if (m.n !== undefined) ctx.addIssue({ code: 'custom', path: ['n'], message: 'give either n and k or an n,k table, not both' })
      for (let i = 1; i < m.table.length; i++) {
        if (!(m.table[i]![0] > m.table[i - 1]![0])) {
          ctx.addIssue({ code: 'custom', path: ['table', i, 0], message: `wavelength (nm) must increase row by row: got ${m.table[i]![0]} after ${m.table[i - 1]![0]}` })
          return
        }
      }
    } else if (m.n === undefined) {
      ctx.addIssue({ code: 'custom', path: ['n'], message: 'is required (or give an n,k table of (wavelength nm, n, k) rows)' })
    }
  })

/** n and k of a material at a wavelength (nm): the pair, or the table linearly interpolated (clamped to its ends). */
export function materialAt(m: OpticalMaterial, nm: number): { n: number; k: number } {
  const t = m.table
  if (t === undefined) return { n: m.n!, k: m.k }
  if (nm <= t[0]![0]) return { n: t[0]![1], k: t[0]![2] }
  const last = t.length - 1
  if (nm >= t[last]![0]) return { n: t[last]![1], k: t[last]![2] }
  let lo = 0, hi = last
  while (hi - lo > 1) { const mid = (lo + hi) >> 1; if (t[mid]![0] <= nm) lo = mid; else hi = mid }
  const a = t[lo]!, b = t[hi]!
  const f = (nm - a[0]) / (b[0] - a[0])
  return { n: a[1] + f * (b[1] - a[1]), k: a[2] + f * (b[2] - a[2]) }
}

/** Whether a material absorbs anywhere (k > 0 at some row). */
function absorbs(m: OpticalMaterial): boolean {
  return m.table ? m.table.some((r) => r[2] > 0) : m.k > 0
}

export const thinFilmLayerSchema = z.object({
  name: z.string().max(40).optional(),
  thicknessNm: z
    .number({ message: 'thicknessNm must be a number' })
    .positive('thicknessNm must be above 0 nm')
    .max(MAX_THIN_FILM_LAYER_NM, `thicknessNm must be at most ${MAX_THIN_FILM_LAYER_NM} nm (10 µm): a thicker layer is not a coherent thin film`),
  material: opticalMaterialSchema,
  emitting: z.boolean().optional(),
})

export const thinFilmSchema = z
  .object({
    layers: z
      .array(thinFilmLayerSchema)
      .min(1, 'the stack needs at least one layer (the emitting layer)')
      .max(MAX_THIN_FILM_LAYERS, `at most ${MAX_THIN_FILM_LAYERS} layers between the glass and the cathode`),
    cathode: z.object({ material: opticalMaterialSchema }),
    emitterPositionNm: z.number({ message: 'emitterPositionNm must be a number' }).min(0, 'emitterPositionNm must not be negative: it is measured from the glass-side boundary of the emitting layer'),
    horizontalDipoleFraction: z.number().min(0, 'horizontalDipoleFraction must be between 0 and 1').max(1, 'horizontalDipoleFraction must be between 0 and 1').default(2 / 3),
    radiativeEfficiency: z.number().min(0, 'radiativeEfficiency must be between 0 and 1').max(1, 'radiativeEfficiency must be between 0 and 1').default(1),
  })
  .superRefine((tf, ctx) => {
    const emitting = tf.layers.flatMap((l, i) => (l.emitting ? [i] : []))
    if (emitting.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['layers'], message: 'no emitting layer: mark exactly one layer with "emitting": true' })
      return
    }
    if (emitting.length > 1) {
      ctx.addIssue({ code: 'custom', path: ['layers', emitting[1]!, 'emitting'], message: `${emitting.length} emitting layers (layers ${emitting.map((i) => i + 1).join(', ')}, counted from the glass): mark exactly one layer as emitting` })
      return
    }
    const e = tf.layers[emitting[0]!]!
    if (tf.emitterPositionNm > e.thicknessNm) {
      ctx.addIssue({ code: 'custom', path: ['emitterPositionNm'], message: `the emitter position ${tf.emitterPositionNm} nm is outside the emitting layer${e.name ? ` ${e.name}` : ''} (thickness ${e.thicknessNm} nm): use 0 to ${e.thicknessNm} nm from its glass-side boundary` })
    }
    if (absorbs(e.material)) {
      ctx.addIssue({ code: 'custom', path: ['layers', emitting[0]!, 'material', e.material.table ? 'table' : 'k'], message: 'the emitting layer must be non-absorbing (k = 0): a dipole in an absorbing host has no finite emitted power to normalise to' })
    }
  })

export type ThinFilm = z.infer<typeof thinFilmSchema>
export type ThinFilmInput = z.input<typeof thinFilmSchema>
export type OpticalMaterial = z.infer<typeof opticalMaterialSchema>
export type OpticalMaterialInput = z.input<typeof opticalMaterialSchema>

/**
 * A green bottom-emitting stack used as the reference case (round, invented values of the usual kind: glass | ITO
 * 100 nm | HTL 40 | EML 20 | ETL 50 | an Al-like cathode n = 0.96 + 6.69i, emitter 10 nm into the EML, isotropic
 * dipoles). The physics tests and the thin-film bench trace the same stack.
 */
export const REFERENCE_GREEN_STACK: ThinFilmInput = {
  layers: [
    { name: 'ITO', thicknessNm: 100, material: { n: 1.9, k: 0.01 } },
    { name: 'HTL', thicknessNm: 40, material: { n: 1.75, k: 0 } },
    { name: 'EML', thicknessNm: 20, material: { n: 1.75, k: 0 }, emitting: true },
    { name: 'ETL', thicknessNm: 50, material: { n: 1.75, k: 0 } },
  ],
  cathode: { material: { n: 0.96, k: 6.69 } },
  emitterPositionNm: 10,
  horizontalDipoleFraction: 2 / 3,
  radiativeEfficiency: 1,
}
