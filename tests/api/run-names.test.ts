// Names of runs and sweeps (default from the design or the axes and the time; renamed by lead or designer) and
// progress counted in the user's rays, against the built server (no worker: the runs stay queued).
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_USERS, loadDemoData } from '../../server/utils/demo'
import { ApiClient } from './client'
import { tracedPerRay } from '../../shared/types/ray-limits'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
afterAll(async () => { await pool.end() })

async function demoClient(role: 'lead' | 'designer' | 'viewer') {
  const u = DEMO_USERS.find((d) => d.role === role)!
  const client = new ApiClient()
  expect((await client.post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(200)
  return client
}

const WHEN = /\d{1,2} [A-Z][a-z]{2} \d\d:\d\d UTC$/

describe('run and sweep names', () => {
  let projectId = ''
  let lens: { id: string; name: string; scenario: Parameters<typeof tracedPerRay>[0] }
  const started: string[] = []
  beforeAll(async () => {
    projectId = (await loadDemoData(dbFromPool(pool))).projectId
    const designer = await demoClient('designer')
    const designs = (await designer.get(`/api/projects/${projectId}/designs`)).body.designs
    lens = designs.find((d: any) => d.scenario.lensArray)
  })
  afterAll(async () => {
    const lead = await demoClient('lead')
    for (const id of started) await lead.post(`/api/runs/${id}/cancel`)
  })

  it('default from the design or the axes and the time; progress counts the user\'s rays, not the companion\'s', async () => {
    const designer = await demoClient('designer')
    const run = await designer.post('/api/runs', { designId: lens.id, precision: { rays: 20_000 } })
    expect(run.status).toBe(201)
    started.push(run.body.run.id)
    expect(run.body.run.name.startsWith(`${lens.name}, `)).toBe(true)
    expect(run.body.run.name).toMatch(WHEN)
    const detail = (await designer.get(`/api/runs/${run.body.run.id}`)).body
    // the team is charged traced rays (a traced planar companion doubles them: shared/types/ray-limits.ts), the
    // progress counts the 20 000 the user asked for
    expect(detail.run.raysPlanned).toBe(20_000 * tracedPerRay(lens.scenario))
    expect(detail.progress.raysPlanned).toBe(20_000)
    expect(detail.progress.raysDone).toBe(0)
    const sweep = await designer.post('/api/sweeps', {
      designId: lens.id, precision: { rays: 5000 },
      axes: [{ parameter: 'lensArray.sagUm', values: [1, 2] }, { parameter: 'lensArray.fillFactor', values: [0.5, 0.6] }],
    })
    expect(sweep.status).toBe(201)
    started.push(sweep.body.sweep.id)
    expect(sweep.body.sweep.name).toMatch(new RegExp(`^Sag × Fill factor, ${WHEN.source}`))
    expect((await designer.get(`/api/sweeps/${sweep.body.sweep.id}`)).body.progress.raysPlanned).toBe(4 * 5000)
  })

  it('lead and designer rename (trimmed, bidi controls stripped); lists and pages show the new name', async () => {
    const designer = await demoClient('designer')
    const run = await designer.post('/api/sweeps', { designId: lens.id, precision: { rays: 5000 }, axes: [{ parameter: 'lensArray.sagUm', values: [1, 2] }] })
    expect(run.status).toBe(201)
    const id = run.body.sweep.id as string
    started.push(id)
    const renamed = await designer.patch(`/api/sweeps/${id}`, { name: '  Sag study \u202Efor the warm stack  ' })
    expect(renamed.status).toBe(200)
    expect(renamed.body.run.name).toBe('Sag study for the warm stack')
    const lead = await demoClient('lead')
    expect((await lead.patch(`/api/runs/${id}`, { name: 'Sag study, lead\'s copy' })).status).toBe(200)
    expect((await lead.get(`/api/sweeps/${id}`)).body.run.name).toBe('Sag study, lead\'s copy')
    const list = (await lead.get(`/api/sweeps?projectId=${projectId}`)).body
    const rows = list.runs ?? list.sweeps
    expect(rows.find((r: any) => r.id === id).name).toBe('Sag study, lead\'s copy')
  })

  it('a viewer gets 403 naming the role; an empty or too long name gets 400 naming the field; nothing changes', async () => {
    const designer = await demoClient('designer')
    const run = await designer.post('/api/runs', { designId: lens.id, precision: { rays: 5000 }, name: 'Kept name' })
    expect(run.status).toBe(201)
    const id = run.body.run.id as string
    started.push(id)
    const viewer = await demoClient('viewer')
    const refused = await viewer.patch(`/api/runs/${id}`, { name: 'Viewer was here' })
    expect(refused.status).toBe(403)
    expect(refused.body.message).toMatch(/viewer; renaming a run or sweep needs lead or designer/)
    const empty = await designer.patch(`/api/runs/${id}`, { name: ' \u200F ' })
    expect(empty.status).toBe(400)
    expect(empty.body.message).toMatch(/name must not be empty/)
    const long = await designer.patch(`/api/runs/${id}`, { name: 'x'.repeat(121) })
    expect(long.status).toBe(400)
    expect(long.body.message).toMatch(/name must be at most 120 characters/)
    const other = await designer.patch(`/api/runs/${id}`, { name: 'ok', figure: 'extraction' })
    expect(other.status).toBe(400)
    expect((await designer.get(`/api/runs/${id}`)).body.run.name).toBe('Kept name')
  })
})
