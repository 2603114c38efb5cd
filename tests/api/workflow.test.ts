// The team workflow against the built server and a real worker process: a small sweep is traced, its finish is
// mailed (the stand-alone worker sends it), cells go on the shortlist, only the lead chooses, results and the
// lens surface are exported, and API tokens act as their user only.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { STLLoader } from 'three/examples/jsm/loaders/STLLoader.js'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_USERS, loadDemoData } from '../../server/utils/demo'
import { ApiClient, signedUpClient, validScenario } from './client'
import { linkIn, rawRequest, waitForMail } from './mail'
import { startWorkerProcess, waitFor, type WorkerProcess } from './jobs'

const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 3 })
let worker: WorkerProcess
let demoProjectId = ''
const demo: Record<'lead' | 'designer' | 'viewer', ApiClient> = {} as never
let sweepId = ''
let designerEmail = ''

const scenario = { ...validScenario, trace: { ...validScenario.trace, rays: 20_000, seed: 5 } }

beforeAll(async () => {
  demoProjectId = (await loadDemoData(dbFromPool(pool))).projectId
  for (const u of DEMO_USERS) {
    const c = new ApiClient()
    expect((await c.post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(200)
    demo[u.role] = c
  }
  designerEmail = DEMO_USERS.find((u) => u.role === 'designer')!.email
  worker = startWorkerProcess(1)
  await worker.ready
  const design = await demo.designer.post(`/api/projects/${demoProjectId}/designs`, { name: `Workflow caps ${Date.now()}`, scenario })
  expect(design.status).toBe(201)
  const created = await demo.designer.post('/api/sweeps', {
    designId: design.body.design.id, name: 'Sag pair', seed: 77, precision: { rays: 20_000 },
    axes: [{ parameter: 'lensArray.sagUm', values: [3, 5] }],
  })
  expect(created.status).toBe(201)
  sweepId = created.body.sweep.id
  await waitFor('sweep to finish', async () => {
    const { rows: [r] } = await pool.query('SELECT status FROM runs WHERE id = $1', [sweepId])
    return r.status === 'done'
  }, 120_000)
})
afterAll(async () => {
  await worker?.kill('SIGTERM')
  await pool.end()
})

describe('sweep finished mail', () => {
  it('goes to whoever started the sweep, with the best cell and a link, sent by the worker process', async () => {
    const mail = await waitForMail(pool, designerEmail, 'Sweep finished: Sag pair')
    const { rows: [run] } = await pool.query('SELECT best_cell_index FROM runs WHERE id = $1', [sweepId])
    expect(run.best_cell_index).not.toBeNull()
    expect(mail.text).toContain(`Best cell by enhancement: cell ${run.best_cell_index}`)
    expect(mail.text).toMatch(/enhancement \d+\.\d+ ± \d+\.\d+/)
    // the cell named in the editor's words and units, never by internal field paths
    expect(mail.text).toMatch(/\(sag [\d.]+ µm\)/)
    expect(mail.text).not.toMatch(/lensArray\.|emitter\.|substrate\.|reflector\./)
    expect(linkIn(mail, '/sweeps/')).toBe(`${baseUrl}/sweeps/${sweepId}`)
    // Exactly one mail for the sweep although two cells finished.
    const { rows: [n] } = await pool.query(`SELECT count(*)::int AS n FROM mailbox_messages WHERE subject LIKE $1 AND rcpt_to ? $2`, ['%Sag pair%', designerEmail])
    expect(n.n).toBe(1)
  })
})

describe('shortlist', () => {
  let entryA = ''
  let entryB = ''
  it('any member bookmarks a cell with a note; a duplicate is refused', async () => {
    const a = await demo.viewer.post(`/api/projects/${demoProjectId}/shortlist`, { runId: sweepId, cellIndex: 0, note: 'Lower sag, easier to emboss' })
    expect(a.status).toBe(201)
    entryA = a.body.entry.id
    const b = await demo.designer.post(`/api/projects/${demoProjectId}/shortlist`, { runId: sweepId, cellIndex: 1, note: 'Hemispheres' })
    expect(b.status).toBe(201)
    entryB = b.body.entry.id
    expect((await demo.lead.post(`/api/projects/${demoProjectId}/shortlist`, { runId: sweepId, cellIndex: 1 })).status).toBe(409)
    expect((await demo.lead.post(`/api/projects/${demoProjectId}/shortlist`, { runId: sweepId, cellIndex: 9 })).status).toBe(404)
    const outsider = await signedUpClient('sl-outsider')
    expect((await outsider.client.post(`/api/projects/${demoProjectId}/shortlist`, { runId: sweepId, cellIndex: 0 })).status).toBe(404)
    expect((await outsider.client.get(`/api/shortlist/${entryA}`)).status).toBe(404)
  })

  it('only the lead marks the chosen candidate (designer and viewer get 403) and can change it', async () => {
    const byDesigner = await demo.designer.post(`/api/shortlist/${entryB}/choose`, { reason: 'best figure' })
    expect(byDesigner.status).toBe(403)
    expect(byDesigner.body.message).toMatch(/needs lead/)
    expect((await demo.viewer.post(`/api/shortlist/${entryB}/choose`, { reason: 'best figure' })).status).toBe(403)
    expect((await demo.lead.post(`/api/shortlist/${entryB}/choose`, { reason: '' })).status).toBe(400)
    expect((await demo.lead.post(`/api/shortlist/${entryB}/choose`, { reason: 'Highest enhancement within the sag limit' })).status).toBe(200)
    let list = (await demo.viewer.get(`/api/projects/${demoProjectId}/shortlist`)).body
    expect(list.entries[0].id).toBe(entryB)
    expect(list.entries[0]).toMatchObject({ chosen: true, chosenReason: 'Highest enhancement within the sag limit', chosenByName: 'Ines Marlow' })
    expect(list.entries[0].figure.stdErr).toBeGreaterThan(0)
    expect(list.entries[0].geometry.sagUm).toBe(5)

    // Another entry holds the mark: moving it is refused until the lead confirms, and the answer names the choice.
    const unconfirmed = await demo.lead.post(`/api/shortlist/${entryA}/choose`, { reason: 'Embossing trial favours the lower sag' })
    expect(unconfirmed.status).toBe(409)
    expect(unconfirmed.body.message).toMatch(/ · cell 1 · .* is the chosen candidate now\. Confirm moving the mark to .* · cell 0 · /)
    expect((await demo.viewer.get(`/api/projects/${demoProjectId}/shortlist`)).body.entries[0].id).toBe(entryB)
    expect((await demo.lead.post(`/api/shortlist/${entryA}/choose`, { reason: 'Embossing trial favours the lower sag', replaceChosen: true })).status).toBe(200)
    list = (await demo.viewer.get(`/api/projects/${demoProjectId}/shortlist`)).body
    // The history says which entry: the new choice names the one it replaced, and the old one names its successor.
    const chosenEv = list.history.find((h: { action: string; entryId: string }) => h.action === 'chosen' && h.entryId === entryA)
    expect(chosenEv.detail.entry).toMatch(/ · cell 0 · /)
    expect(chosenEv.detail.previousLabel).toMatch(/ · cell 1 · /)
    const unchosenEv = list.history.find((h: { action: string; entryId: string }) => h.action === 'unchosen' && h.entryId === entryB)
    expect(unchosenEv.detail).toMatchObject({ replacedBy: entryA })
    expect(unchosenEv.detail.entry).toMatch(/ · cell 1 · /)
    expect(list.entries.filter((e: { chosen: boolean }) => e.chosen).map((e: { id: string }) => e.id)).toEqual([entryA])
    expect(list.entries[0].id).toBe(entryA)
    const actions = list.history.filter((h: { entryId: string }) => [entryA, entryB].includes(h.entryId)).map((h: { action: string; actor: string }) => `${h.action}:${h.actor}`)
    expect(actions).toEqual(expect.arrayContaining(['added:Priya Halden', 'added:Tomas Okafor', 'chosen:Ines Marlow', 'unchosen:Ines Marlow']))
    expect((await demo.designer.post(`/api/shortlist/${entryA}/unchoose`)).status).toBe(403)
  })

  it('members comment on notes; only the author or a lead edits a note', async () => {
    expect((await demo.viewer.post(`/api/shortlist/${entryB}/comments`, { body: 'Can the line hold 5 µm sag?' })).status).toBe(201)
    expect((await demo.viewer.post(`/api/shortlist/${entryB}/comments`, { body: '' })).status).toBe(400)
    expect((await demo.viewer.patch(`/api/shortlist/${entryB}`, { note: 'changed by viewer' })).status).toBe(403)
    expect((await demo.designer.patch(`/api/shortlist/${entryB}`, { note: 'Hemispheres, 5 µm sag' })).status).toBe(200)
    const detail = (await demo.lead.get(`/api/shortlist/${entryB}`)).body
    expect(detail.entry.note).toBe('Hemispheres, 5 µm sag')
    expect(detail.comments.map((c: { author: string; body: string }) => `${c.author}: ${c.body}`)).toEqual(['Priya Halden: Can the line hold 5 µm sag?'])
  })
})

describe('pages', () => {
  it('the printable report of the chosen candidate renders on the server: who chose it and why, σ, polar SVG, cautions', async () => {
    const list = (await demo.viewer.get(`/api/projects/${demoProjectId}/shortlist`)).body
    const chosen = list.entries.find((e: { chosen: boolean }) => e.chosen)
    const res = await fetch(`${baseUrl}/reports/${chosen.id}`, { headers: { cookie: demo.viewer.cookie } })
    expect(res.status).toBe(200)
    const html = await res.text()
    expect(html).toContain('Chosen for fabrication by Ines Marlow')
    expect(html).toContain(chosen.chosenReason)
    expect(html).toMatch(/Enhancement over the flat device[\s\S]*?\d\.\d+ ± \d\.\d+/)
    expect(html).toContain('<polyline')
    expect(html).toContain('local codes')
  })

  it('the account page, the project page with its shortlist and the mailbox render', async () => {
    for (const path of ['/account', `/projects/${demoProjectId}`, '/dev/mailbox']) {
      const res = await fetch(baseUrl + path, { headers: { cookie: demo.lead.cookie } })
      expect(res.status, path).toBe(200)
    }
    const project = await (await fetch(`${baseUrl}/projects/${demoProjectId}`, { headers: { cookie: demo.lead.cookie } })).text()
    expect(project).toContain('Shortlist')
    expect(project).toContain('Embossing trial favours the lower sag')
  })
})

describe('exports', () => {
  it('results as JSON and long-format CSV with σ, θ–φ map and losses', async () => {
    const json = await demo.viewer.get(`/api/runs/${sweepId}/cells/0/export?format=json`)
    expect(json.status).toBe(200)
    expect(json.body.result.intensity.perSteradianStdErr).toHaveLength(json.body.result.intensity.thetaCentersDeg.length)
    // the exported scenario says what was traced: the cell's rays and seed, not the design's request
    expect(json.body.cell.scenario.trace.rays).toBe(json.body.result.rays)
    expect(json.body.cell.scenario.trace.seed).toBe(Number(json.body.cell.seed))
    const csv = await rawRequest(baseUrl, 'GET', `/api/runs/${sweepId}/cells/0/export?format=csv`, { headers: { cookie: demo.viewer.cookie } })
    expect(csv.status).toBe(200)
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    expect(csv.headers.get('content-disposition')).toMatch(/^attachment; filename="[A-Za-z0-9._-]+_cell0\.csv"$/)
    const lines = csv.bytes.trim().split('\n').filter((l: string) => !l.startsWith('#'))
    expect(lines[0]).toBe('section,theta_deg,phi_deg,quantity,value,std_err')
    const ext = lines.find((l: string) => l.startsWith('summary,,,extraction,'))!.split(',')
    expect(Number(ext[4])).toBeCloseTo(json.body.result.extraction, 12)
    expect(Number(ext[5])).toBeCloseTo(json.body.result.extractionStdErr, 12)
    const r = json.body.result
    expect(lines.filter((l: string) => l.startsWith('map,'))).toHaveLength(r.intensity.map.thetaBins * r.intensity.map.phiBins)
    expect(lines.filter((l: string) => l.startsWith('losses,'))).toHaveLength(Object.keys(r.losses).length)
  })

  it('the STL patch parses back to 2·nx·ny triangles spanning the land (0) to the sag', async () => {
    // Cell 1 of the sweep: hexagonal hemispheres, pitch = diameter = 10 µm, sag 5 µm.
    const res = await fetch(`${baseUrl}/api/runs/${sweepId}/cells/1/surface?format=stl&lensesX=4&lensesY=3&samplesPerPitch=20`, { headers: { cookie: demo.viewer.cookie } })
    expect(res.status).toBe(200)
    const buf = await res.arrayBuffer()
    const geom = new STLLoader().parse(buf)
    const nx = 4 * 20, ny = Math.round((3 * 10 * Math.sqrt(3) / 2) / (10 / 20))
    const triangles = geom.getAttribute('position').count / 3
    expect(triangles).toBe(2 * nx * ny)
    expect(buf.byteLength).toBe(84 + 50 * triangles)
    geom.computeBoundingBox()
    const bb = geom.boundingBox!
    expect(bb.min.z).toBeCloseTo(0, 6)
    // Grid points fall near but not exactly on the vertices: the top is within the sag's last 2 %.
    expect(bb.max.z).toBeLessThanOrEqual(5 + 1e-5)
    expect(bb.max.z).toBeGreaterThan(4.9)
    expect(bb.max.x - bb.min.x).toBeCloseTo(40, 4)
  })

  it('the sag table follows the spherical cap h − (Rc − √(Rc² − r²)) and too many triangles are refused', async () => {
    const r = await rawRequest(baseUrl, 'GET', `/api/runs/${sweepId}/cells/0/surface?format=sag&points=11`, { headers: { cookie: demo.viewer.cookie } })
    expect(r.status).toBe(200)
    const rows = r.bytes.trim().split('\n').filter((l: string) => !l.startsWith('#')).slice(1).map((l: string) => l.split(',').map(Number))
    expect(rows).toHaveLength(11)
    // Cell 0: D = 10 µm, h = 3 µm → Rc = (25 + 9)/6 (standard spherical-cap geometry).
    const Rc = (25 + 9) / 6
    for (const [rr, height, sag] of rows) {
      expect(sag).toBeCloseTo(Rc - Math.sqrt(Rc * Rc - rr * rr), 5)
      expect(height).toBeCloseTo(3 - sag, 5)
    }
    const big = await demo.viewer.get(`/api/runs/${sweepId}/cells/0/surface?format=stl&lensesX=500&lensesY=500&samplesPerPitch=400`)
    expect(big.status).toBe(400)
  })
})

describe('API tokens', () => {
  it('work for their user, fail after revocation, never reach another team, and cannot mint tokens', async () => {
    const other = await signedUpClient('tok-other')
    const otherProject = await other.client.post('/api/projects', { teamId: other.teamId, name: 'Other team work' })
    expect(otherProject.status).toBe(201)

    const made = await demo.designer.post('/api/account/tokens', { name: 'sweep script' })
    expect(made.status).toBe(201)
    const token = made.body.token as string
    const { rows: [stored] } = await pool.query('SELECT token_hash FROM api_tokens WHERE id = $1', [made.body.id])
    expect(stored.token_hash).not.toContain(token.slice(3))
    const auth = { authorization: `Bearer ${token}` }

    const me = await rawRequest(baseUrl, 'GET', '/api/auth/me', { headers: auth })
    expect(me.status).toBe(200)
    expect(me.body.user.email).toBe(designerEmail)
    expect((await rawRequest(baseUrl, 'GET', `/api/projects/${demoProjectId}/designs`, { headers: auth })).status).toBe(200)
    // A state-changing request with a token needs no Origin.
    const posted = await rawRequest(baseUrl, 'POST', `/api/projects/${demoProjectId}/designs`, {
      headers: { ...auth, 'content-type': 'application/json' }, body: JSON.stringify({ name: `Scripted ${Date.now()}`, scenario }),
    })
    expect(posted.status).toBe(201)
    // Another team's project is as invisible with a token as with a session.
    expect((await rawRequest(baseUrl, 'GET', `/api/projects/${otherProject.body.project.id}`, { headers: auth })).status).toBe(404)
    expect((await rawRequest(baseUrl, 'GET', `/api/projects/${otherProject.body.project.id}/designs`, { headers: auth })).status).toBe(404)
    // The role still applies: a designer's token cannot choose.
    const list = (await demo.lead.get(`/api/projects/${demoProjectId}/shortlist`)).body
    expect((await rawRequest(baseUrl, 'POST', `/api/shortlist/${list.entries[0].id}/choose`, { headers: { ...auth, 'content-type': 'application/json' }, body: JSON.stringify({ reason: 'scripted' }) })).status).toBe(403)
    // A token cannot create tokens.
    expect((await rawRequest(baseUrl, 'POST', '/api/account/tokens', { headers: { ...auth, 'content-type': 'application/json' }, body: JSON.stringify({ name: 'x' }) })).status).toBe(403)
    // A bad token does not fall back to the session cookie sent beside it.
    expect((await rawRequest(baseUrl, 'GET', '/api/auth/me', { headers: { authorization: 'Bearer lf_nope', cookie: demo.designer.cookie } })).status).toBe(401)

    expect((await demo.designer.delete(`/api/account/tokens/${made.body.id}`)).status).toBe(200)
    const after = await rawRequest(baseUrl, 'GET', '/api/auth/me', { headers: auth })
    expect(after.status).toBe(401)
    expect(after.body.message).toMatch(/revoked/)
    expect((await other.client.delete(`/api/account/tokens/${made.body.id}`)).status).toBe(404)
  })
})
