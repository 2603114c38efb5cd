import { describe, expect, it } from 'vitest'
import { zodValidator } from '../../server/utils/validation'
import { designCreateSchema } from '../../shared/types/design'
import { indexAt, scenarioSchema } from '../../shared/types/scenario'
import { cropIndexRows, resolveTableRefs, restoreTableRefs, tableRefsOf, type RefTable } from '../../shared/types/table-refs'
import { parseDataTable } from '../../shared/utils/csv-table'

const ID_N = '00000000-0000-4000-8000-000000000001'
const ID_SP = '00000000-0000-4000-8000-000000000002'
// An n,k table of an invented coating polymer, 400–800 nm every 50 nm.
const nk: RefTable = { id: ID_N, kind: 'refractive_index', name: 'polymer A', rows: [400, 450, 500, 550, 600, 650, 700, 750, 800].map((nm) => [nm, 1.6 - (nm - 400) * 1e-4, 0]) }
const spectrum: RefTable = { id: ID_SP, kind: 'emission_spectrum', name: 'green OLED', rows: [[480, 0], [520, 0.6], [530, 1], [560, 0.4], [620, 0]] }
const tables = new Map([[ID_N, nk], [ID_SP, spectrum]])
const base = () => ({
  emitter: { index: 1.8, spectrum: { tableId: ID_SP } as unknown },
  reflector: { reflectance: 0.8 },
  substrate: { index: { tableId: ID_N } as unknown, thicknessUm: 700 },
  lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 5 } as Record<string, unknown> | null,
})

describe('table references in a scenario', () => {
  it('finds the references by field', () => {
    expect(tableRefsOf(base()).map((r) => [r.field.path.join('.'), r.tableId])).toEqual([['emitter.spectrum', ID_SP], ['substrate.index', ID_N]])
  })

  it('resolves spectrum and index to inline tables, the index cropped to the spectrum (one row beyond each end)', () => {
    const r = resolveTableRefs(base(), (id) => tables.get(id))
    expect(r.errors).toEqual([])
    const sc = scenarioSchema.parse(r.scenario)
    expect(sc.emitter.spectrum).toEqual({ table: spectrum.rows })
    const sub = sc.substrate.index as { table: number[][] }
    expect(sub.table.map((row) => row[0])).toEqual([450, 500, 550, 600, 650])
    // the lens follows the substrate: the same rows
    expect(sc.lensArray!.index).toEqual(sc.substrate.index)
    expect(indexAt(sc.substrate.index, 525)).toBeCloseTo(1.5875, 12)
  })

  it('names the field for an unknown table, a table of the wrong kind and a table that does not cover the spectrum', () => {
    const unknown = base(); unknown.substrate.index = { tableId: '00000000-0000-4000-8000-00000000dead' }
    expect(resolveTableRefs(unknown, (id) => tables.get(id)).errors[0]!.message).toMatch(/^Substrate index: no uploaded table .* in your team's projects/)
    const wrong = base(); wrong.emitter.spectrum = { tableId: ID_N }
    expect(resolveTableRefs(wrong, (id) => tables.get(id)).errors[0]).toEqual({ path: 'emitter.spectrum', message: 'Emission spectrum: the table "polymer A" is a refractive-index table (wavelength_nm, n, k); this field needs an emission-spectrum table (wavelength_nm, intensity)' })
    const wide = base(); wide.emitter.spectrum = { peakNm: 600, fwhmNm: 80 }
    expect(resolveTableRefs(wide, (id) => tables.get(id)).errors[0]!.message).toBe('Substrate index: the table "polymer A" covers 400–800 nm but the spectrum spans 360–840 nm; pick a table that covers it or narrow the spectrum')
  })

  it('puts the references back after parsing (what a design stores), the lens following the substrate reference', () => {
    const raw = base()
    const parsed = scenarioSchema.parse(resolveTableRefs(raw, (id) => tables.get(id)).scenario)
    const stored = restoreTableRefs(parsed, raw) as any
    expect(stored.substrate.index).toEqual({ tableId: ID_N })
    expect(stored.lensArray.index).toEqual({ tableId: ID_N })
    expect(stored.emitter.spectrum).toEqual({ tableId: ID_SP })
    expect(stored.trace.fresnel).toBe('averaged')
  })

  it('the design body accepts references and still words other problems as the editor does', () => {
    const ok = zodValidator(designCreateSchema)({ name: 'x', scenario: base() })
    expect((ok.scenario as any).substrate.index).toEqual({ tableId: ID_N })
    const bad = base(); bad.lensArray!.sagUm = 6
    expect(() => zodValidator(designCreateSchema)({ name: 'x', scenario: bad })).toThrow('Sag h must be at most D/2 = 5 µm for a spherical cap: got 6 µm')
  })

  it('keeps two rows around a single line', () => {
    expect(cropIndexRows(nk.rows, 550, 550).map((r) => r[0])).toEqual([550, 600])
    expect(cropIndexRows(nk.rows, 800, 800).map((r) => r[0])).toEqual([750, 800])
  })
})

describe('emission spectrum uploads', () => {
  const enc = (s: string) => new TextEncoder().encode(s)
  it('reads wavelength_nm, intensity', () => {
    const r = parseDataTable('emission_spectrum', enc('# spectrometer export\nwavelength_nm,intensity\n480,0\n530,1\n620,0\n'))
    expect(r).toMatchObject({ ok: true, columns: ['wavelength_nm', 'intensity'], rows: [[480, 0], [530, 1], [620, 0]] })
  })
  it('refuses wavelengths outside 200–2500 nm, negative power and an all-zero spectrum, naming the line', () => {
    const r = parseDataTable('emission_spectrum', enc('wavelength_nm,intensity\n150,0\n530,-1\n'))
    expect(r.ok).toBe(false)
    const msgs = (r as { errors: { message: string }[] }).errors.map((e) => e.message)
    expect(msgs).toContain('line 2, wavelength_nm: must be between 200 and 2500 nm, got 150')
    expect(msgs).toContain('line 3, intensity: relative spectral power must be 0 or more, got -1')
    const z = parseDataTable('emission_spectrum', enc('wavelength_nm,intensity\n500,0\n530,0\n'))
    expect((z as { errors: { message: string }[] }).errors[0]!.message).toBe('at least one relative spectral power must be above 0')
  })
})

describe('resolving reactive editor state', () => {
  it('reads through a Proxy (as Vue hands the draft over) and keeps NaN entries for the schema to name', () => {
    const raw = base(); (raw.reflector as Record<string, unknown>).reflectance = NaN
    const proxied = new Proxy(raw, {})
    const r = resolveTableRefs(proxied, (id) => tables.get(id))
    expect(r.errors).toEqual([])
    expect(Number.isNaN((r.scenario as any).reflector.reflectance)).toBe(true)
    expect((r.scenario as any).emitter.spectrum.table).toHaveLength(5)
  })
})
