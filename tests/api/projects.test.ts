import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_USERS, loadDemoData } from '../../server/utils/demo'
import { ApiClient, signedUpClient, validScenario } from './client'

const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let demoProjectId = ''
beforeAll(async () => {
  // The demo team has one user per role; loading is idempotent, so other files may load it too.
  demoProjectId = (await loadDemoData(dbFromPool(pool))).projectId
})
afterAll(() => pool.end())

async function demoClient(role: 'lead' | 'designer' | 'viewer') {
  const u = DEMO_USERS.find((d) => d.role === role)!
  const client = new ApiClient()
  const res = await client.post('/api/auth/sign-in', { email: u.email, password: u.password })
  expect(res.status).toBe(200)
  return client
}

describe('roles on designs', () => {
  it('a viewer can read designs but gets 403 on create, change and delete', async () => {
    const viewer = await demoClient('viewer')
    const list = await viewer.get(`/api/projects/${demoProjectId}/designs`)
    expect(list.status).toBe(200)
    expect(list.body.designs.length).toBeGreaterThanOrEqual(4)
    const before = (await pool.query('SELECT count(*)::int AS n FROM designs WHERE project_id = $1', [demoProjectId])).rows[0].n

    const create = await viewer.post(`/api/projects/${demoProjectId}/designs`, { name: 'Viewer attempt', scenario: validScenario })
    expect(create.status).toBe(403)
    expect(create.body.message).toMatch(/viewer/)
    const someDesign = list.body.designs[0]
    expect((await viewer.patch(`/api/designs/${someDesign.id}`, { name: 'Renamed by viewer' })).status).toBe(403)
    expect((await viewer.delete(`/api/designs/${someDesign.id}`)).status).toBe(403)

    expect((await pool.query('SELECT count(*)::int AS n FROM designs WHERE project_id = $1', [demoProjectId])).rows[0].n).toBe(before)
    const again = await viewer.get(`/api/designs/${someDesign.id}`)
    expect(again.body.design.name).toBe(someDesign.name)
    expect(again.body.design.version).toBe(someDesign.version)
  })

  it('a designer creates a design (v1), saves a change (v2), and a stale save is refused (409)', async () => {
    const designer = await demoClient('designer')
    const name = `Designer sweep start ${Date.now()}`
    const created = await designer.post(`/api/projects/${demoProjectId}/designs`, { name, scenario: validScenario })
    expect(created.status).toBe(201)
    expect(created.body.design.version).toBe(1)
    const id = created.body.design.id

    const changed = await designer.patch(`/api/designs/${id}`, {
      baseVersion: 1,
      scenario: { ...validScenario, lensArray: { ...validScenario.lensArray, sagUm: 3 } },
    })
    expect(changed.status).toBe(200)
    expect(changed.body.design.version).toBe(2)
    expect(changed.body.design.scenario.lensArray.sagUm).toBe(3)

    const stale = await designer.patch(`/api/designs/${id}`, { baseVersion: 1, name: `${name} (stale)` })
    expect(stale.status).toBe(409)
    expect((await designer.get(`/api/designs/${id}`)).body.design.name).toBe(name)

    expect((await designer.delete(`/api/designs/${id}`)).status).toBe(204)
    expect((await designer.get(`/api/designs/${id}`)).status).toBe(404)
  })

  it('an invalid scenario is refused with a 400 naming the field, and nothing is stored', async () => {
    const designer = await demoClient('designer')
    const name = `Too deep ${Date.now()}`
    const res = await designer.post(`/api/projects/${demoProjectId}/designs`, {
      name,
      scenario: { ...validScenario, lensArray: { ...validScenario.lensArray, sagUm: 6 } },
    })
    expect(res.status).toBe(400)
    expect(res.body.message).toContain('Sag h must be at most D/2')
    expect((await pool.query('SELECT 1 FROM designs WHERE name = $1', [name])).rowCount).toBe(0)

    const missing = await designer.post(`/api/projects/${demoProjectId}/designs`, { name })
    expect(missing.status).toBe(400)
    expect(missing.body.message).toMatch(/^scenario is required/)
  })
})

describe('team isolation', () => {
  it('a project of another team is 404 for every route, the same as a project that does not exist', async () => {
    const a = await signedUpClient('owner')
    const project = await a.client.post('/api/projects', { teamId: a.teamId, name: 'Private film study' })
    expect(project.status).toBe(201)
    const projectId = project.body.project.id
    const design = await a.client.post(`/api/projects/${projectId}/designs`, { name: 'Secret caps', scenario: validScenario })
    expect(design.status).toBe(201)
    expect((await a.client.get(`/api/projects/${projectId}`)).status).toBe(200)

    const b = await signedUpClient('outsider')
    const seen = await b.client.get(`/api/projects/${projectId}`)
    expect(seen.status).toBe(404)
    expect((await b.client.get(`/api/projects/${projectId}/designs`)).status).toBe(404)
    expect((await b.client.post(`/api/projects/${projectId}/designs`, { name: 'Intrusion', scenario: validScenario })).status).toBe(404)
    expect((await b.client.get(`/api/designs/${design.body.design.id}`)).status).toBe(404)
    expect((await b.client.delete(`/api/designs/${design.body.design.id}`)).status).toBe(404)
    expect((await b.client.post('/api/projects', { teamId: a.teamId, name: 'In their team' })).status).toBe(404)
    const none = await b.client.get('/api/projects/00000000-0000-4000-8000-000000000000')
    expect(none.status).toBe(404)
    expect(none.body.message).toBe(seen.body.message)
    expect((await b.client.get('/api/projects')).body.projects).toEqual([])
    // The owner's design is untouched.
    expect((await a.client.get(`/api/designs/${design.body.design.id}`)).status).toBe(200)
  })

  it('signed-out requests get 401, malformed ids 400 naming the parameter', async () => {
    const anon = new ApiClient()
    expect((await anon.get('/api/projects')).status).toBe(401)
    expect((await anon.get(`/api/projects/${demoProjectId}`)).status).toBe(401)
    const lead = await demoClient('lead')
    const bad = await lead.get('/api/projects/not-a-uuid')
    expect(bad.status).toBe(400)
    expect(bad.body.message).toMatch(/^id in the address must be a UUID/)
  })
})
