// Uploaded emission spectra and n,k tables used by reference ({ tableId }) in a design: checked when the design is
// saved (field-named 400s), resolved to the inline rows when a run or sweep is created, so the run's stored scenario
// does not change when the table does. Another team's table reads exactly as an unknown one.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { signedUpClient, validScenario } from './client'
import { rawRequest } from './mail'

const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let owner: Awaited<ReturnType<typeof signedUpClient>>
let other: Awaited<ReturnType<typeof signedUpClient>>
let projectId = ''
let otherProjectId = ''
const ids: Record<string, string> = {}

function upload(who: typeof owner, project: string, kind: string, body: string, name: string) {
  return rawRequest(baseUrl, 'POST', `/api/projects/${project}/tables?kind=${kind}&name=${encodeURIComponent(name)}&fileName=${encodeURIComponent(`${name}.csv`)}`, {
    headers: { cookie: who.client.cookie, origin: baseUrl, 'content-type': 'text/csv' }, body,
  })
}

// Invented: a green emitter's spectrum (480–620 nm) and the n,k of a lens resin (400–800 nm, slightly absorbing in the blue).
const greenCsv = 'wavelength_nm,intensity\n480,0\n500,0.2\n520,0.7\n530,1\n545,0.6\n570,0.2\n620,0\n'
const resinCsv = `wavelength_nm,n,k\n${[400, 450, 500, 550, 600, 650, 700, 750, 800].map((nm) => `${nm},${(1.6 - (nm - 400) * 1e-4).toFixed(4)},${nm < 450 ? '1e-5' : '0'}`).join('\n')}\n`
const narrowCsv = 'wavelength_nm,n,k\n500,1.55,0\n540,1.54,0\n'

const SMALL = { precision: { rays: 2000 } }
async function runCount() {
  const { rows: [r] } = await pool.query('SELECT count(*)::int AS n FROM runs WHERE project_id = $1', [projectId])
  return r.n as number
}
const withRefs = (patch: { spectrum?: unknown; substrateIndex?: unknown; lensIndex?: unknown; emitterIndex?: unknown }) => ({
  ...validScenario,
  emitter: { ...validScenario.emitter, index: patch.emitterIndex ?? 1.7, ...(patch.spectrum !== undefined ? { spectrum: patch.spectrum } : {}) },
  substrate: { ...validScenario.substrate, index: patch.substrateIndex ?? 1.5 },
  lensArray: { ...validScenario.lensArray, index: patch.lensIndex ?? 1.5 },
  trace: { ...validScenario.trace, rays: 2000 },
})

beforeAll(async () => {
  owner = await signedUpClient('spectral')
  other = await signedUpClient('spectral-other')
  projectId = (await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Green panel' })).body.project.id
  otherProjectId = (await other.client.post('/api/projects', { teamId: other.teamId, name: 'Their panel' })).body.project.id
  for (const [key, who, project, kind, csv] of [
    ['green', owner, projectId, 'emission_spectrum', greenCsv],
    ['resin', owner, projectId, 'refractive_index', resinCsv],
    ['narrow', owner, projectId, 'refractive_index', narrowCsv],
    ['theirs', other, otherProjectId, 'refractive_index', resinCsv],
  ] as const) {
    const r = await upload(who, project, kind, csv, key)
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    ids[key] = r.body.table.id
  }
})
afterAll(async () => { await pool.end() })

describe('emission-spectrum uploads', () => {
  it('are stored with their columns and offered as emitter.spectrum', async () => {
    const got = await owner.client.get(`/api/tables/${ids.green}`)
    expect(got.status).toBe(200)
    expect(got.body.table).toMatchObject({ kind: 'emission_spectrum', columns: ['wavelength_nm', 'intensity'], rowCount: 7 })
    expect(got.body.table.use).toEqual({ spectrum: { table: [[480, 0], [500, 0.2], [520, 0.7], [530, 1], [545, 0.6], [570, 0.2], [620, 0]] } })
  })

  it('a wavelength outside 200–2500 nm is refused with the line and nothing stored', async () => {
    const r = await upload(owner, projectId, 'emission_spectrum', 'wavelength_nm,intensity\n150,0\n530,1\n', 'uv')
    expect(r.status).toBe(422)
    expect(r.body.message).toContain('line 2, wavelength_nm: must be between 200 and 2500 nm, got 150')
    const { rows: [c] } = await pool.query('SELECT count(*)::int AS n FROM data_tables WHERE project_id = $1 AND name = $2', [projectId, 'uv'])
    expect(c.n).toBe(0)
  })
})

describe('designs refer to tables by id', () => {
  it('a design keeps the references; the run stores the resolved rows, unchanged when the table changes later', async () => {
    const scenario = withRefs({ spectrum: { tableId: ids.green }, substrateIndex: { tableId: ids.resin }, lensIndex: { tableId: ids.resin } })
    const d = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Green on resin', scenario })
    expect(d.status, JSON.stringify(d.body)).toBe(201)
    expect(d.body.design.scenario.emitter.spectrum).toEqual({ tableId: ids.green })
    expect(d.body.design.scenario.substrate.index).toEqual({ tableId: ids.resin })
    const run = await owner.client.post('/api/runs', { designId: d.body.design.id, ...SMALL })
    expect(run.status, JSON.stringify(run.body)).toBe(201)
    const cell = (await owner.client.get(`/api/runs/${run.body.run.id}/cells/0`)).body.cell
    expect(cell.scenario.emitter.spectrum.table).toHaveLength(7)
    // the resin table cropped to the spectrum's 480–620 nm plus one row beyond each end
    expect(cell.scenario.substrate.index.table.map((r: number[]) => r[0])).toEqual([450, 500, 550, 600, 650])
    expect(cell.scenario.lensArray.index).toEqual(cell.scenario.substrate.index)
    const stored = JSON.stringify(cell.scenario)
    await pool.query(`UPDATE data_tables SET rows = '[[400,1.9,0],[800,1.9,0]]'::jsonb WHERE id = $1`, [ids.resin])
    const again = (await owner.client.get(`/api/runs/${run.body.run.id}/cells/0`)).body.cell
    expect(JSON.stringify(again.scenario)).toBe(stored)
    const runRow = (await owner.client.get(`/api/runs/${run.body.run.id}`)).body.run
    expect(runRow.baseScenario.substrate.index.table[0]).toEqual([450, 1.595, 0])
    // a run created now reads the table as it is now
    const run2 = await owner.client.post('/api/runs', { designId: d.body.design.id, ...SMALL })
    expect(run2.status).toBe(201)
    const cell2 = (await owner.client.get(`/api/runs/${run2.body.run.id}/cells/0`)).body.cell
    expect(cell2.scenario.substrate.index.table).toEqual([[400, 1.9, 0], [800, 1.9, 0]])
  })

  it('a sweep resolves the references in every cell', async () => {
    const d = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Green sweep', scenario: withRefs({ spectrum: { tableId: ids.green }, emitterIndex: { tableId: ids.resin } }) })
    expect(d.status, JSON.stringify(d.body)).toBe(201)
    const s = await owner.client.post('/api/sweeps', { designId: d.body.design.id, ...SMALL, axes: [{ parameter: 'lensArray.sagUm', values: [3, 5] }] })
    expect(s.status, JSON.stringify(s.body)).toBe(201)
    for (const i of [0, 1]) {
      const cell = (await owner.client.get(`/api/sweeps/${s.body.sweep.id}/cells/${i}`)).body.cell
      expect(cell.scenario.emitter.spectrum.table).toHaveLength(7)
      expect(Array.isArray(cell.scenario.emitter.index.table)).toBe(true)
    }
  })

  const refused: Array<[string, () => ReturnType<typeof withRefs>, RegExp]> = [
    ['an unknown table', () => withRefs({ substrateIndex: { tableId: '00000000-0000-4000-8000-000000000000' } }), /^Substrate index: no uploaded table "00000000-0000-4000-8000-000000000000" in your team's projects/],
    ['a malformed id (as unknown)', () => withRefs({ lensIndex: { tableId: 'not-an-id' } }), /^Lens index: no uploaded table "not-an-id" in your team's projects/],
    ['a table of the wrong kind for the spectrum', () => withRefs({ spectrum: { tableId: ids.resin } }), /^Emission spectrum: the table "resin" is a refractive-index table \(wavelength_nm, n, k\); this field needs an emission-spectrum table/],
    ['a table of the wrong kind for an index', () => withRefs({ emitterIndex: { tableId: ids.green } }), /^Emitter index: the table "green" is an emission-spectrum table/],
    ['an index table not covering the spectrum', () => withRefs({ spectrum: { tableId: ids.green }, lensIndex: { tableId: ids.narrow } }), /^Lens index: the table "narrow" covers 500–540 nm but the spectrum spans 480–620 nm/],
    ['a Sellmeier formula giving n < 1 inside the spectrum', () => withRefs({ spectrum: { peakNm: 530, fwhmNm: 40 }, lensIndex: { sellmeier: { B: [0.1, 0, 0], C: [0.3, 0, 0] } } }), /^Lens index: the Sellmeier formula gives n = /],
    ['a negative wavelength', () => withRefs({ spectrum: { wavelengthNm: -530 } }), /^Emission wavelength must be at least 200 nm: got -530 nm/],
  ]
  for (const [what, scenario, message] of refused) {
    it(`refuses ${what} with a field-named 400 and stores no design`, async () => {
      const r = await owner.client.post(`/api/projects/${projectId}/designs`, { name: `refused ${what}`, scenario: scenario() })
      expect(r.status).toBe(400)
      expect(r.body.message).toMatch(message)
      const { rows: [c] } = await pool.query('SELECT count(*)::int AS n FROM designs WHERE project_id = $1 AND name = $2', [projectId, `refused ${what}`])
      expect(c.n).toBe(0)
    })
  }

  it('another team\'s table reads exactly as an unknown one', async () => {
    const theirs = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'borrowed', scenario: withRefs({ substrateIndex: { tableId: ids.theirs } }) })
    const none = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'borrowed', scenario: withRefs({ substrateIndex: { tableId: '00000000-0000-4000-8000-0000000000ff' } }) })
    expect(theirs.status).toBe(400)
    expect(theirs.body.message.replace(ids.theirs!, 'ID')).toBe(none.body.message.replace('00000000-0000-4000-8000-0000000000ff', 'ID'))
  })

  it('a design whose table no longer covers its spectrum cannot start a run, and nothing is stored', async () => {
    const d = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Green on narrow later', scenario: withRefs({ spectrum: { wavelengthNm: 520 }, substrateIndex: { tableId: ids.narrow } }) })
    expect(d.status, JSON.stringify(d.body)).toBe(201)
    // the table is narrowed after the design was saved
    await pool.query(`UPDATE data_tables SET rows = '[[530,1.55,0],[540,1.54,0]]'::jsonb WHERE id = $1`, [ids.narrow])
    const before = await runCount()
    for (const path of ['/api/runs', '/api/sweeps']) {
      const r = await owner.client.post(path, { designId: d.body.design.id, ...SMALL, ...(path === '/api/sweeps' ? { axes: [{ parameter: 'lensArray.sagUm', values: [3, 5] }] } : {}) })
      expect(r.status).toBe(400)
      expect(r.body.message).toMatch(/^Substrate index: the table "narrow" covers 530–540 nm but the spectrum spans 520–520 nm/)
      expect(r.body.data.issues[0].path).toBe('scenario.substrate.index')
    }
    expect(await runCount()).toBe(before)
  })

  it('a PATCH with a reference is checked the same way', async () => {
    const d = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Patched', scenario: withRefs({}) })
    const bad = await owner.client.patch(`/api/designs/${d.body.design.id}`, { scenario: withRefs({ emitterIndex: { tableId: ids.green } }), baseVersion: 1 })
    expect(bad.status).toBe(400)
    expect(bad.body.message).toMatch(/^Emitter index: the table "green" is an emission-spectrum table/)
    const good = await owner.client.patch(`/api/designs/${d.body.design.id}`, { scenario: withRefs({ spectrum: { tableId: ids.green } }), baseVersion: 1 })
    expect(good.status).toBe(200)
    expect(good.body.design.version).toBe(2)
  })
})
