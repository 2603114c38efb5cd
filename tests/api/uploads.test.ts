// Uploads of measurement tables: a good file is stored and used by a traced run; every kind of bad file gets a 4xx
// naming the line and leaves nothing stored.
import net from 'node:net'
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { traceScenario } from '../../shared/optics'
import { scenarioSchema } from '../../shared/types/scenario'
import { signedUpClient, validScenario } from './client'
import { rawRequest } from './mail'
import { startWorkerProcess, waitFor, type WorkerProcess } from './jobs'

const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let owner: Awaited<ReturnType<typeof signedUpClient>>
let projectId = ''
let worker: WorkerProcess | undefined

beforeAll(async () => {
  owner = await signedUpClient('uploads')
  const p = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Uploads' })
  projectId = p.body.project.id
})
afterAll(async () => {
  await worker?.kill('SIGTERM')
  await pool.end()
})

function upload(kind: string, body: string | Uint8Array, fileName = 'trace.csv', name = `t-${Math.random().toString(36).slice(2)}`) {
  return rawRequest(baseUrl, 'POST', `/api/projects/${projectId}/tables?kind=${kind}&name=${encodeURIComponent(name)}&fileName=${encodeURIComponent(fileName)}`, {
    headers: { cookie: owner.client.cookie, origin: baseUrl, 'content-type': 'text/csv' }, body,
  })
}

async function storedCount() {
  const { rows: [r] } = await pool.query('SELECT count(*)::int AS n FROM data_tables WHERE project_id = $1', [projectId])
  return r.n as number
}

const lensCsv = (rows: Array<[number, number]>) => `r_um,height_um\n${rows.map((r) => r.join(',')).join('\n')}\n`

describe('bad uploads are refused with the line named and nothing stored', () => {
  const cases: Array<[string, string, string | Uint8Array, string, number, RegExp]> = [
    ['wrong columns', 'lens_profile', 'x,y\n0,1\n1,0\n', 'a.csv', 422, /line 1: the header must name the columns r_um, height_um/],
    ['non-numeric cell', 'lens_profile', 'r_um,height_um\n0,2\n1,abc\n2,0\n', 'a.csv', 422, /line 3, height_um: "abc" is not a number/],
    ['negative height', 'lens_profile', 'r_um,height_um\n0,2\n1,-0.5\n2,0\n', 'a.csv', 422, /line 3, height_um: height must be 0 or more/],
    ['non-monotone radius', 'lens_profile', 'r_um,height_um\n0,2\n2,1\n1,0.5\n3,0\n', 'a.csv', 422, /line 4, r_um: must increase line by line/],
    ['formula cell', 'lens_profile', 'r_um,height_um\n0,2\n1,=1+1\n2,0\n', 'a.csv', 422, /line 3, height_um: "=1\+1" looks like a spreadsheet formula/],
    ['formula disguised with a minus', 'angular_profile', 'theta_deg,intensity\n0,1\n10,-1+2\n', 'a.csv', 422, /line 3, intensity: "-1\+2" looks like a spreadsheet formula/],
    ['@ formula', 'refractive_index', 'wavelength_nm,n,k\n450,1.5,0\n550,@SUM(A1),0\n', 'a.csv', 422, /line 3, n: "@SUM\(A1\)" looks like a spreadsheet formula/],
    ['binary content named .csv', 'lens_profile', new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 8, 0]), 'profile.csv', 415, /ZIP archive/],
    ['NUL bytes named .csv', 'lens_profile', new Uint8Array([0x72, 0x2c, 0x7a, 0x0a, 0, 0, 0x31]), 'profile.csv', 415, /NUL bytes/],
    ['path-like file name', 'lens_profile', lensCsv([[0, 2], [1, 1], [2, 0]]), '../../etc/profile.csv', 400, /plain file name, not a path/],
    ['Windows path file name', 'lens_profile', lensCsv([[0, 2], [1, 1], [2, 0]]), 'C:\\data\\p.csv', 400, /not a path/],
    ['too many rows', 'angular_profile', `theta_deg,intensity\n${Array.from({ length: 100_001 }, (_, i) => `${(i * 0.0009).toFixed(4)},1`).join('\n')}\n`, 'a.csv', 413, /more than 100000 data rows/],
    ['refractive index out of range', 'refractive_index', 'wavelength_nm,n,k\n450,1.5,0\n550,0.5,0\n', 'a.csv', 422, /line 3, n: refractive index n must be between 1 and 5/],
  ]
  for (const [what, kind, body, fileName, status, message] of cases) {
    it(what, async () => {
      const before = await storedCount()
      const r = await upload(kind, body, fileName)
      expect(r.status).toBe(status)
      expect(r.body.message).toMatch(message)
      expect(await storedCount()).toBe(before)
    })
  }

  it('a declared length over 2 MB is refused with 413 before the body is sent', async () => {
    // Headers only, with Content-Length 3 MB and no body: the answer must come without the server waiting for it.
    const url = new URL(baseUrl)
    const reply = await new Promise<string>((resolve, reject) => {
      const s = net.connect(Number(url.port), url.hostname, () => {
        s.write(`POST /api/projects/${projectId}/tables?kind=lens_profile&name=big&fileName=big.csv HTTP/1.1\r\nHost: ${url.host}\r\n`
          + `Origin: ${baseUrl}\r\nCookie: ${owner.client.cookie}\r\nContent-Type: text/csv\r\nContent-Length: 3000000\r\n\r\n`)
      })
      let data = ''
      s.on('data', (d) => { data += d.toString(); if (data.includes('\r\n\r\n')) { s.destroy(); resolve(data) } })
      s.on('error', reject)
      setTimeout(() => { s.destroy(); reject(new Error('no answer within 5 s: the server waited for the body')) }, 5000)
    })
    expect(reply.split('\r\n')[0]).toMatch(/^HTTP\/1.1 413/)
  })

  it('a real body over 2 MB is refused with 413 too', async () => {
    const r = await upload('angular_profile', 'theta_deg,intensity\n' + '1,1\n'.repeat(600_000))
    expect(r.status).toBe(413)
  })

  it('another team cannot upload into the project (404, like a missing one)', async () => {
    const outsider = await signedUpClient('uploads-out')
    const r = await rawRequest(baseUrl, 'POST', `/api/projects/${projectId}/tables?kind=lens_profile&name=x&fileName=x.csv`, {
      headers: { cookie: outsider.client.cookie, origin: baseUrl }, body: lensCsv([[0, 2], [1, 1], [2, 0]]),
    })
    expect(r.status).toBe(404)
  })
})

describe('good uploads', () => {
  it('accepts negative-looking numbers as numbers only where they are allowed, comments and a BOM', async () => {
    const r = await upload('refractive_index', '\uFEFF# ellipsometry, sample 7\nwavelength_nm,n,k\n450,1.52,+0.0\n550,1.51,0\n650,1.505,1e-4\n')
    expect(r.status).toBe(201)
    expect(r.body.table).toMatchObject({ kind: 'refractive_index', rowCount: 3, columns: ['wavelength_nm', 'n', 'k'] })
  })

  it('a lens profile is stored and offered as a measured lens shape', async () => {
    const rows: Array<[number, number]> = []
    for (let i = 0; i <= 50; i++) { const r = (5 * i) / 50; rows.push([r, Math.sqrt(25 - r * r)]) }
    const r = await upload('lens_profile', lensCsv(rows), 'hemisphere profile.csv', 'Hemisphere trace')
    expect(r.status).toBe(201)
    expect(r.body.table.use.lensArray).toMatchObject({ shape: 'measured', diameterUm: 10, sagUm: 5 })
    const got = await owner.client.get(`/api/tables/${r.body.table.id}`)
    expect(got.body.table.rows).toHaveLength(51)
  })

  it('an angular profile is used by a run: cos θ traced through the queue matches the built-in Lambertian within 5σ', async () => {
    const rows = Array.from({ length: 91 }, (_, d) => `${d},${Math.cos((d * Math.PI) / 180).toFixed(6)}`).join('\n')
    const up = await upload('angular_profile', `theta_deg,intensity\n${rows}\n`, 'emitter.csv', 'Lambertian-like')
    expect(up.status).toBe(201)
    const table = (await owner.client.get(`/api/tables/${up.body.table.id}`)).body.table
    const base = { ...validScenario, trace: { ...validScenario.trace, rays: 60_000, seed: 21 } }
    const scenario = { ...base, emitter: { ...base.emitter, ...table.use } }
    const design = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Measured emitter', scenario })
    expect(design.status).toBe(201)
    worker = startWorkerProcess(1)
    await worker.ready
    const run = await owner.client.post('/api/runs', { designId: design.body.design.id, seed: 21, precision: { rays: 60_000 } })
    expect(run.status).toBe(201)
    const done = await waitFor('run to finish', async () => {
      const r = await owner.client.get(`/api/runs/${run.body.run.id}/cells/0`)
      return r.body.cell.status === 'done' ? r.body : null
    }, 120_000)
    expect(done.cell.scenario.emitter.angularProfile.table).toHaveLength(91)
    // Seed 22 for the reference keeps the two estimates independent.
    const ref = traceScenario(scenarioSchema.parse({ ...base, emitter: { ...base.emitter, angularProfile: 'lambertian' } }), { rays: 200_000, seed: 22 })
    const sigma = Math.hypot(done.result.extractionStdErr, ref.extractionStdErr)
    expect(Math.abs(done.result.extraction - ref.extraction)).toBeLessThan(5 * sigma)
    // A control that must differ: an isotropic emitter extracts measurably less than a Lambertian one here.
    const iso = traceScenario(scenarioSchema.parse(base), { rays: 200_000, seed: 23 })
    expect(Math.abs(iso.extraction - ref.extraction)).toBeGreaterThan(5 * Math.hypot(iso.extractionStdErr, ref.extractionStdErr))
  })

  it('a measured lens profile is used by a run through the queue: a sampled sphere matches the analytic cap within 5σ', async () => {
    // D 10 µm, sag 3 µm spherical cap sampled at 0.05 µm (standard cap geometry: Rc = (a² + h²)/(2h)).
    const a = 5, h = 3, Rc = (a * a + h * h) / (2 * h)
    const rows: Array<[number, number]> = Array.from({ length: 101 }, (_, i) => { const r = (a * i) / 100; return [r,
      Number((Math.sqrt(Rc * Rc - r * r) - (Rc - h)).toFixed(9))] })
    const up = await upload('lens_profile', lensCsv(rows), 'cap-3um.csv', 'Sampled 3 µm cap')
    expect(up.status).toBe(201)
    const use = (await owner.client.get(`/api/tables/${up.body.table.id}`)).body.table.use
    const base = { ...validScenario, trace: { ...validScenario.trace, rays: 60_000, seed: 31 } }
    const scenario = { ...base, lensArray: { ...base.lensArray, ...use.lensArray } }
    const design = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Measured caps', scenario })
    expect(design.status).toBe(201)
    expect(design.body.design.scenario.lensArray).toMatchObject({ shape: 'measured', diameterUm: 10, sagUm: 3 })
    worker ??= startWorkerProcess(1)
    await worker.ready
    const run = await owner.client.post('/api/runs', { designId: design.body.design.id, seed: 31, precision: { rays: 60_000 } })
    expect(run.status).toBe(201)
    const done = await waitFor('measured run to finish', async () => {
      const r = await owner.client.get(`/api/runs/${run.body.run.id}/cells/0`)
      return r.body.cell.status === 'done' ? r.body : null
    }, 120_000)
    const ref = traceScenario(scenarioSchema.parse({ ...base, lensArray: { ...base.lensArray, sagUm: 3 } }), { rays: 200_000, seed: 32 })
    expect(Math.abs(done.result.extraction - ref.extraction)).toBeLessThan(5 * Math.hypot(done.result.extractionStdErr, ref.extractionStdErr))
  })
})
