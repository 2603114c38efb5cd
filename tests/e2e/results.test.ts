// Result pages in a real browser against the demo data a newcomer sees first: the demo team's finished 6 × 6
// sweep (traced with the engine at start-up), its heat map (best cell named only once the sweep has ended, the
// paired-noise note, the derived sag column) and the project's fabrication limit marking cells that break it.
// Screenshots go to test-output/e2e/.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO_USERS } from '../../server/utils/demo'
import { DEMO_RUN, DEMO_SHORTLIST, DEMO_SWEEP } from '../../server/utils/demo-results'
import { collectErrors, launch, shot, signIn, type Page } from './browser'

const baseUrl = inject('e2eBaseUrl')
const projectId = inject('e2eProjectId')
const lead = DEMO_USERS.find((u) => u.role === 'lead')!
const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!

let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []
let sweepUrl = ''

interface ApiCell { cellIndex: number; coordinates: number[]; status: string; summary: { enhancement: number; enhancementStdErr: number } | null }

beforeAll(async () => {
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
})
afterAll(async () => { await session?.close() })

/** Sag of a spherical cap of radius R over a chord D: R − √(R² − (D/2)²) (elementary geometry, sagitta formula). */
const sagUm = (radiusUm: number, diameterUm: number) => radiusUm - Math.sqrt(radiusUm ** 2 - (diameterUm / 2) ** 2)
/** Hexagonal lattice fill factor πD²/(2√3·p²) solved for D (area of a circle over a hexagonal unit cell). */
const hexDiameterUm = (fill: number, pitchUm: number) => pitchUm * Math.sqrt((2 * Math.sqrt(3) * fill) / Math.PI)

describe('demo results', () => {
  it('the demo project already shows a finished run, a finished sweep and a chosen shortlist candidate with a comment', async () => {
    await signIn(page, baseUrl, lead.email, lead.password)
    pageErrors.length = 0 // the signed-out probe of the sign-in page answers 401 by design
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await page.getByRole('link', { name: DEMO_SWEEP.name }).first().waitFor()
    expect(await page.getByRole('link', { name: DEMO_RUN.name }).count()).toBeGreaterThan(0)
    await expect.poll(() => page.getByText(DEMO_SHORTLIST.chosenReason).count()).toBeGreaterThan(0)
    expect(await page.getByTestId('limits-summary').textContent()).toContain('sag ≤ 5 µm')
    await shot(page, '20-demo-project')
  })

  it('the demo sweep: heat map, best cell named with its σ, the paired-noise note matching σ_diff = √(σ₁² + σ₂²)', async () => {
    await Promise.all([page.waitForURL(/\/sweeps\//), page.getByRole('link', { name: DEMO_SWEEP.name }).first().click()])
    sweepUrl = page.url()
    await page.locator('[data-testid=sweep-heatmap] canvas').first().waitFor()
    await page.locator('[data-testid=sweep-best][data-final=true]').waitFor()
    const sweepId = sweepUrl.split('/').pop()!.split('?')[0]!
    const api = await page.evaluate(async (u) => (await fetch(u)).json(), `/api/sweeps/${sweepId}`) as { cells: ApiCell[]; run: { baseScenario: { lensArray: { pitchUm: number } } } }
    const done = api.cells.filter((c) => c.status === 'done' && c.summary)
    expect(done).toHaveLength(36)
    const best = done.reduce((a, b) => (b.summary!.enhancement > a.summary!.enhancement ? b : a))
    const ties = done.filter((c) => c !== best
      && Math.abs(c.summary!.enhancement - best.summary!.enhancement) < 2 * Math.hypot(c.summary!.enhancementStdErr, best.summary!.enhancementStdErr))
    const bestText = (await page.getByTestId('sweep-best').textContent())!
    expect(bestText).toContain(`cell ${best.cellIndex}`)
    expect(bestText).toMatch(/±/)
    const noise = (await page.getByTestId('sweep-best-noise').textContent())!
    if (ties.length) expect(noise).toContain(`Within noise of ${ties.length} ${ties.length === 1 ? 'cell' : 'cells'} (difference < 2σ`)
    else expect(noise).toContain('Ahead of every other cell by more than 2σ')

    // The derived sag column: radius of curvature and fill factor give D, then the sag, per cell.
    const headers = await page.locator('[data-testid=sweep-table] thead th').allTextContents()
    const sagCol = headers.findIndex((h) => h.startsWith('Sag (µm)'))
    expect(sagCol).toBeGreaterThan(0)
    const pitch = api.run.baseScenario.lensArray.pitchUm
    const row = page.locator('[data-testid=sweep-table] tbody tr').filter({ has: page.locator('td:first-child', { hasText: new RegExp(`^${best.cellIndex}$`) }) })
    const shownSag = Number(await row.locator('td').nth(sagCol).textContent())
    const [radius, fill] = best.coordinates as [number, number]
    expect(shownSag).toBeCloseTo(sagUm(radius, hexDiameterUm(fill, pitch)), 2) // shown to 0.01 µm
    await shot(page, '21-demo-sweep')
  })

  it('a lead sets a tighter sag limit; the sweep marks exactly the cells whose sag exceeds it', async () => {
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await page.getByTestId('limits-edit').click()
    await page.fill('#limit-sag', '-1')
    await page.getByTestId('limits-save').click()
    await expect.poll(() => page.getByTestId('limits-problem').textContent()).toContain('above 0 µm')
    await page.fill('#limit-sag', '2')
    await page.getByTestId('limits-save').click()
    await expect.poll(() => page.getByTestId('limits-summary').textContent()).toContain('sag ≤ 2 µm')
    await page.goto(sweepUrl)
    await page.locator('[data-testid=sweep-heatmap] canvas').first().waitFor()
    const sweepId = sweepUrl.split('/').pop()!.split('?')[0]!
    const api = await page.evaluate(async (u) => (await fetch(u)).json(), `/api/sweeps/${sweepId}`) as { cells: ApiCell[]; run: { baseScenario: { lensArray: { pitchUm: number } } } }
    const pitch = api.run.baseScenario.lensArray.pitchUm
    const over = api.cells.filter((c) => c.status === 'done' && sagUm(c.coordinates[0]!, hexDiameterUm(c.coordinates[1]!, pitch)) > 2).length
    expect(over).toBeGreaterThan(0)
    expect(over).toBeLessThan(36)
    await expect.poll(() => page.locator('[data-testid=sweep-table] td[data-breaks-limit=true]').count()).toBe(over)
    expect(await page.locator('[data-testid=sweep-table] td[data-breaks-limit=true]').first().textContent()).toMatch(/sag \d+\.\d\d µm > 2\.00 µm/) // shown to 0.01 µm, as the sag column
    await shot(page, '22-demo-sweep-limit')
    // back to the demo's stated limit
    const res = await page.evaluate(async (u) => (await fetch(u, { method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ limits: { maxSagUm: 5 } }) })).status, `/api/projects/${projectId}`)
    expect(res).toBe(200)
    expect(pageErrors).toEqual([])
  })

  it('the demo run: half-disc polar plot with the near-axis bins pooled (said in the note), dates with an ISO tooltip', async () => {
    await page.goto(`${baseUrl}/projects/${projectId}`)
    const when = page.locator('time[datetime]').first()
    await when.waitFor()
    const iso = (await when.getAttribute('datetime'))!
    expect(iso).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/)
    expect(await when.getAttribute('title')).toBe(iso)
    await Promise.all([page.waitForURL(/\/runs\//), page.getByRole('link', { name: DEMO_RUN.name }).first().click()])
    await page.locator('[data-testid=chart-polar] canvas').first().waitFor()
    expect(await page.getByTestId('chart-polar').textContent()).toMatch(/0–5° pooled into one value \([\d.e−-]+ ± [\d.e−-]+ sr⁻¹\)/)
    await shot(page, '23-demo-run')
    expect(pageErrors).toEqual([])
  })

  it('the report of the chosen demo candidate names the sweep point by its axes and words figures as the result page', async () => {
    const list = await page.evaluate(async (u) => (await fetch(u)).json(), `/api/projects/${projectId}/shortlist`) as { entries: Array<{ id: string; chosen: boolean }> }
    const chosen = list.entries.find((e) => e.chosen)!
    await page.goto(`${baseUrl}/reports/${chosen.id}`)
    await page.getByTestId('report-point').waitFor()
    expect(await page.getByTestId('report-point').textContent()).toMatch(/^Radius of curvature [\d.]+ µm, Fill factor [\d.]+$/)
    const text = (await page.locator('body').textContent())!
    expect(text).toMatch(/Half-luminance angle(above 89\.5°|[\d.]+ ± [\d.]+°)/)
    expect(text).toContain('Lambertian source of the same extracted flux')
    await shot(page, '24-demo-report')
  })

  it('a viewer reads the limits but gets no edit button, and is refused by the server', async () => {
    const s = await launch()
    try {
      const p = await s.browser.newPage()
      await signIn(p, baseUrl, viewer.email, viewer.password)
      await p.goto(`${baseUrl}/projects/${projectId}`)
      await p.getByTestId('limits-summary').waitFor()
      expect(await p.getByTestId('limits-edit').count()).toBe(0)
      const status = await p.evaluate(async (u) => (await fetch(u, { method: 'PATCH', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ limits: { maxSagUm: 9 } }) })).status, `/api/projects/${projectId}`)
      expect(status).toBe(403)
    } finally { await s.close() }
  })
})
