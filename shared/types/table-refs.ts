// References from a scenario to uploaded tables: `{ "tableId": "…" }` in emitter.spectrum (an emission_spectrum
// table) and in emitter.index, substrate.index, lensArray.index (refractive_index tables). A design stores the
// reference; a run or sweep stores the scenario with every reference replaced by the table's rows (the inline
// `{ "table": [...] }` form of shared/types/scenario.ts), so a result stays reproducible when a table changes or
// goes. Pure: the server resolves with the tables it loads (team-scoped), the editor with the rows it fetched.
import { z } from 'zod'
import { scenarioSchema, spectrumRangeNm, spectrumSchema, type Scenario } from './scenario'

export const tableRefSchema = z.object({ tableId: z.string() }).strict()
export type TableRef = z.infer<typeof tableRefSchema>
export type RefTableKind = 'refractive_index' | 'emission_spectrum'

/** A table as the resolver needs it. */
export interface RefTable { id: string; kind: string; name: string; rows: number[][] }

export interface TableRefField { path: readonly ['emitter' | 'substrate' | 'lensArray', 'index' | 'spectrum']; kind: RefTableKind; words: string }

/** The fields that may hold a reference, the spectrum first (the index tables are checked over its range). */
export const TABLE_REF_FIELDS: readonly TableRefField[] = [
  { path: ['emitter', 'spectrum'], kind: 'emission_spectrum', words: 'Emission spectrum' },
  { path: ['emitter', 'index'], kind: 'refractive_index', words: 'Emitter index' },
  { path: ['substrate', 'index'], kind: 'refractive_index', words: 'Substrate index' },
  { path: ['lensArray', 'index'], kind: 'refractive_index', words: 'Lens index' },
]

export const TABLE_KIND_WORDS: Record<string, string> = {
  refractive_index: 'a refractive-index table (wavelength_nm, n, k)',
  emission_spectrum: 'an emission-spectrum table (wavelength_nm, intensity)',
  lens_profile: 'a lens-profile table',
  angular_profile: 'an angular-profile table',
}

/** Most rows an inline table of a scenario holds (shared/types/scenario.ts). */
const MAX_INLINE_ROWS = 5000

export function isTableRef(v: unknown): v is TableRef {
  return tableRefSchema.safeParse(v).success
}

function at(raw: unknown, path: readonly string[]): unknown {
  let v = raw
  for (const k of path) {
    if (v === null || typeof v !== 'object') return undefined
    v = (v as Record<string, unknown>)[k]
  }
  return v
}

/** The references a (raw) scenario holds, by field. */
export function tableRefsOf(raw: unknown): Array<{ field: TableRefField; tableId: string }> {
  const out: Array<{ field: TableRefField; tableId: string }> = []
  for (const field of TABLE_REF_FIELDS) {
    const v = at(raw, field.path)
    if (isTableRef(v)) out.push({ field, tableId: v.tableId })
  }
  return out
}

/**
 * A deep copy of plain JSON-like data. Not structuredClone: the editor passes reactive proxies, which it cannot
 * clone; not JSON: a NaN (an unparseable entry) must stay NaN for the schema to name it.
 */
function plainCopy(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(plainCopy)
  if (v !== null && typeof v === 'object') {
    const out: Record<string, unknown> = {}
    for (const k of Object.keys(v)) out[k] = plainCopy((v as Record<string, unknown>)[k])
    return out
  }
  return v
}

/** A copy of `raw` with `value` at `path` (the parents exist: a reference was found there). */
function withValue<T>(raw: T, path: readonly string[], value: unknown): T {
  const copy = plainCopy(raw) as Record<string, unknown>
  let v = copy
  for (const k of path.slice(0, -1)) v = v[k] as Record<string, unknown>
  v[path[path.length - 1]!] = value
  return copy as T
}

function round4(x: number): number {
  return Number(x.toPrecision(4))
}

/**
 * The rows of an index table a spectrum spanning [lo, hi] needs: those inside plus the one beyond each end (for the
 * interpolation), at least two, thinned evenly (ends kept) to what a scenario holds.
 */
export function cropIndexRows(rows: number[][], lo: number, hi: number): number[][] {
  let i0 = 0, i1 = rows.length - 1
  for (let i = 0; i < rows.length; i++) if (rows[i]![0]! <= lo) i0 = i
  for (let i = rows.length - 1; i >= 0; i--) if (rows[i]![0]! >= hi) i1 = i
  if (i1 <= i0) { if (i0 + 1 < rows.length) i1 = i0 + 1; else i0 = i1 - 1 }
  const kept = rows.slice(i0, i1 + 1)
  const n = kept.length
  if (n <= MAX_INLINE_ROWS) return kept
  return Array.from({ length: MAX_INLINE_ROWS }, (_, i) => kept[Math.round((i * (n - 1)) / (MAX_INLINE_ROWS - 1))]!)
}

export interface ResolvedRefs {
  /** The raw scenario with each resolved reference replaced by the inline table (unresolved ones as they were). */
  scenario: unknown
  /** One message per reference that cannot be used, in the editor's words, with the scenario path it is about. */
  errors: Array<{ path: string; message: string }>
  /** References whose table the caller has not loaded yet (those `isPending` says so of). */
  pending: string[]
}

/**
 * Replaces every reference by its table's rows. `lookup` returns the table if the reader may use it (another
 * team's table must come back undefined: it reads as unknown). A table `isPending` says is still loading is stood
 * in for by a neutral value (a 550 nm line, n = 1.5) so the rest of the scenario can still be checked meanwhile;
 * any other unknown table is an error.
 */
export function resolveTableRefs(raw: unknown, lookup: (id: string) => RefTable | undefined, opts: { isPending?: (id: string) => boolean } = {}): ResolvedRefs {
  let scenario = raw
  const errors: ResolvedRefs['errors'] = []
  const pending: string[] = []
  let range: [number, number] | null = null
  for (const { field, tableId } of tableRefsOf(raw)) {
    const path = field.path.join('.')
    const spectrumField = field.kind === 'emission_spectrum'
    if (!spectrumField && range === null) {
      const sp = spectrumSchema.optional().safeParse(at(scenario, ['emitter', 'spectrum']))
      range = sp.success ? spectrumRangeNm(sp.data) : null
    }
    if (tableId === '') {
      errors.push({ path, message: `${field.words}: choose an uploaded table (${TABLE_KIND_WORDS[field.kind]})` })
      continue
    }
    const t = lookup(tableId)
    if (!t) {
      if (opts.isPending?.(tableId)) {
        pending.push(tableId)
        scenario = withValue(scenario, field.path, spectrumField ? { wavelengthNm: 550 } : 1.5)
      } else {
        errors.push({ path, message: `${field.words}: no uploaded table ${JSON.stringify(tableId)} in your team's projects (deleted, or never uploaded); pick another table` })
      }
      continue
    }
    if (t.kind !== field.kind) {
      errors.push({ path, message: `${field.words}: the table "${t.name}" is ${TABLE_KIND_WORDS[t.kind] ?? t.kind}; this field needs ${TABLE_KIND_WORDS[field.kind]}` })
      continue
    }
    if (spectrumField) {
      scenario = withValue(scenario, field.path, { table: t.rows.map((r) => [r[0]!, r[1]!]) })
      continue
    }
    const rows = t.rows.map((r) => [r[0]!, r[1]!, r[2]!])
    if (range !== null && rows.length >= 2) {
      const t0 = rows[0]![0]!, t1 = rows[rows.length - 1]![0]!
      if (range[0] < t0 || range[1] > t1) {
        errors.push({ path, message: `${field.words}: the table "${t.name}" covers ${t0}–${t1} nm but the spectrum spans ${round4(range[0])}–${round4(range[1])} nm; pick a table that covers it or narrow the spectrum` })
        continue
      }
      scenario = withValue(scenario, field.path, { table: cropIndexRows(rows, range[0], range[1]) })
    } else {
      scenario = withValue(scenario, field.path, { table: rows })
    }
  }
  return { scenario, errors, pending }
}

/**
 * The parsed scenario (defaults filled in) with the references of `raw` put back where they were: what a design
 * stores. A lens without its own index follows the substrate's, so it gets the substrate's reference.
 */
export function restoreTableRefs(parsed: Scenario, raw: unknown): unknown {
  let out: unknown = parsed
  for (const { field, tableId } of tableRefsOf(raw)) {
    if (field.path[0] === 'lensArray' && parsed.lensArray === null) continue
    out = withValue(out, field.path, { tableId })
  }
  const substrateRef = at(raw, ['substrate', 'index'])
  if (parsed.lensArray !== null && isTableRef(substrateRef) && at(raw, ['lensArray', 'index']) === undefined) {
    out = withValue(out, ['lensArray', 'index'], { tableId: substrateRef.tableId })
  }
  return out
}

/**
 * A scenario as a design stores it: the scenario schema with table references allowed (checked here with neutral
 * stand-ins; whether each table exists, is of the right kind and covers the spectrum is the server's check with
 * the tables themselves, server/utils/table-refs.ts). Output: parsed, defaults filled in, references kept.
 */
export const scenarioWithRefsSchema = z.unknown().transform((raw, ctx) => {
  const stood = resolveTableRefs(raw, () => undefined, { isPending: () => true })
  const r = scenarioSchema.safeParse(stood.scenario)
  if (!r.success) {
    for (const iss of r.error.issues) ctx.addIssue({ ...iss } as Parameters<typeof ctx.addIssue>[0])
    return z.NEVER
  }
  return restoreTableRefs(r.data, raw) as ScenarioWithRefs
})

/** A stored design scenario: a Scenario whose spectrum and indices may be table references. */
export type ScenarioWithRefs = Omit<Scenario, 'emitter' | 'substrate' | 'lensArray'> & {
  emitter: Omit<Scenario['emitter'], 'index' | 'spectrum'> & { index: Scenario['emitter']['index'] | TableRef; spectrum?: Scenario['emitter']['spectrum'] | TableRef }
  substrate: Omit<Scenario['substrate'], 'index'> & { index: Scenario['substrate']['index'] | TableRef }
  lensArray: (Omit<NonNullable<Scenario['lensArray']>, 'index'> & { index: NonNullable<Scenario['lensArray']>['index'] | TableRef }) | null
}
