// Stylus traces fitted at upload: the raw trace is kept, the fitted profile is what the scenario traces, and only a
// trace that cannot be one cap is refused (with its line), leaving nothing stored.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { signedUpClient, validScenario } from './client'
import { rawRequest } from './mail'

const baseUrl = inject('baseUrl')
const pool = new pg.Pool({ connectionString: inject('databaseUrl'), max: 2 })
let owner: Awaited<ReturnType<typeof signedUpClient>>
let projectId = ''

beforeAll(async () => {
  owner = await signedUpClient('trace-fit')
  const p = await owner.client.post('/api/projects', { teamId: owner.teamId, name: 'Stylus traces' })
  projectId = p.body.project.id
})
afterAll(async () => { await pool.end() })

function upload(kind: string, body: string, query: string, name = `t-${Math.random().toString(36).slice(2)}`) {
  return rawRequest(baseUrl, 'POST', `/api/projects/${projectId}/tables?kind=${kind}&name=${encodeURIComponent(name)}&fileName=trace.csv${query}`, {
    headers: { cookie: owner.client.cookie, origin: baseUrl, 'content-type': 'text/csv' }, body,
  })
}
async function storedCount() {
  const { rows: [r] } = await pool.query('SELECT count(*)::int AS n FROM data_tables WHERE project_id = $1', [projectId])
  return r.n as number
}

// Spherical cap R = 10 µm cut at a = 5 µm: sag h = R − √(R² − a²) = 1.3397 µm (standard cap geometry), with a fixed
// ±2 nm ripple and a 2 nm rise at the last point (profilometer noise of that size is common practice).
const R = 10, a = 5
const sphere = (r: number) => Math.sqrt(R * R - r * r) - Math.sqrt(R * R - a * a)
const noisyRows = Array.from({ length: 51 }, (_, i) => { const r = (a * i) / 50; return [r, Math.max(0,
  sphere(r) + (i % 2 ? 0.002 : -0.002)) + (i === 50 ? 0.004 : 0)] })
const csv = (rows: number[][]) => `# stylus, 2 µm tip\nr_um,height_um\n${rows.map((r) => `${r[0]!.toFixed(4)},${r[1]!.toFixed(6)}`).join('\n')}\n`

describe('stylus traces at upload', () => {
  it('without a fit, a 2 nm rise is refused and the message offers the fit', async () => {
    const r = await upload('lens_profile', csv(noisyRows), '')
    expect(r.status).toBe(422)
    expect(r.body.message).toMatch(/line \d+, height_um: height must not rise towards the rim .* fit the trace at upload/)
  })

  it('the isotonic fit stores raw and fitted rows; the scenario uses the fitted, monotone profile', async () => {
    const r = await upload('lens_profile', csv(noisyRows), '&fit=isotonic&smoothPoints=5', 'Noisy cap, isotonic')
    expect(r.status).toBe(201)
    expect(r.body.table.fit).toMatchObject({ method: 'isotonic', smoothPoints: 5 })
    expect(r.body.table.fit.rmsResidualNm).toBeGreaterThan(0.5)
    expect(r.body.table.fit.rmsResidualNm).toBeLessThan(5)
    const t = (await owner.client.get(`/api/tables/${r.body.table.id}`)).body.table
    expect(t.rows).toEqual(csv(noisyRows).trim().split('\n').slice(2).map((l) => l.split(',').map(Number)))
    expect(t.sourceText).toBe(csv(noisyRows)) // the file itself, comment line included
    for (let i = 1; i < t.fittedRows.length; i++) expect(t.fittedRows[i][1]).toBeLessThanOrEqual(t.fittedRows[i - 1][1])
    const prof = t.use.lensArray.profile as number[][]
    expect(prof[prof.length - 1]![1]).toBe(0)
    for (let i = 1; i < prof.length; i++) expect(prof[i]![1]!).toBeLessThanOrEqual(prof[i - 1]![1]!)
    // Sag of the fitted profile within the noise (and the smoothing's flattening of the apex) of the closed form.
    expect(Math.abs(t.use.lensArray.sagUm - sphere(0))).toBeLessThan(0.01)
    expect(t.use.lensArray.diameterUm).toBe(10)
  })

  it('the conic fit recovers the sphere (R = 10 µm, k ≈ 0) and is what the scenario traces', async () => {
    const r = await upload('lens_profile', csv(noisyRows), '&fit=asphere&asphereTerms=0', 'Noisy cap, conic')
    expect(r.status).toBe(201)
    expect(r.body.table.fit.method).toBe('asphere')
    expect(Math.abs(r.body.table.fit.params.radiusUm - R)).toBeLessThan(0.3)
    expect(r.body.table.fit.rmsResidualNm).toBeLessThan(5)
    const design = await owner.client.post(`/api/projects/${projectId}/designs`, { name: 'Fitted caps', scenario: { ...validScenario, lensArray: { ...validScenario.lensArray, ...r.body.table.use.lensArray } } })
    expect(design.status).toBe(201)
    expect(design.body.design.scenario.lensArray.shape).toBe('measured')
  })

  it('what cannot be one cap is refused with its line, and nothing is stored', async () => {
    const before = await storedCount()
    const bumped = noisyRows.map(([r, z]) => [r!, z! + (r! > 3 && r! < 4 ? 0.2 : 0)])
    const bump = await upload('lens_profile', csv(bumped), '&fit=isotonic')
    expect(bump.status).toBe(422)
    expect(bump.body.message).toMatch(/^Nothing was stored\. line \d+: the trace departs from the fitted cap by [\d.]+ nm, more than 2 % of the sag/)
    const few = await upload('lens_profile', csv(noisyRows.slice(0, 4)), '&fit=asphere')
    expect(few.status).toBe(422)
    expect(few.body.message).toMatch(/the asphere fit needs at least 5 data rows; the trace has 4/)
    const neg = await upload('lens_profile', 'r_um,height_um\n0,1\n1,-0.01\n2,0\n3,0\n4,0\n', '&fit=isotonic')
    expect(neg.status).toBe(422)
    expect(neg.body.message).toMatch(/line 3, height_um: height must be 0 or more/)
    const wrongKind = await upload('angular_profile', 'theta_deg,intensity\n0,1\n10,1\n', '&fit=isotonic')
    expect(wrongKind.status).toBe(400)
    expect(wrongKind.body.message).toMatch(/fit applies to lens profiles only/)
    const badWindow = await upload('lens_profile', csv(noisyRows), '&fit=isotonic&smoothPoints=4')
    expect(badWindow.status).toBe(400)
    expect(badWindow.body.message).toMatch(/smoothPoints must be odd/)
    expect(await storedCount()).toBe(before)
  })
})
