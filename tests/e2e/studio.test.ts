// The design studio in a real browser (Debian's Chromium, headless) against the built server with its embedded
// worker and the demo data: a designer builds, traces and sweeps a design; a viewer sees the same pages without
// edit controls; the 3-D preview falls back to the 2-D cut without WebGL. Screenshots go to test-output/e2e/.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO_USERS } from '../../server/utils/demo'
import { collectErrors, launch, shot, signIn, type Page } from './browser'

const baseUrl = inject('e2eBaseUrl')
const projectId = inject('e2eProjectId')
const designer = DEMO_USERS.find((u) => u.role === 'designer')!
const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!

let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []
let designUrl = ''
let runUrl = ''
let sweepUrl = ''

beforeAll(async () => {
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
})
afterAll(async () => { await session?.close() })

const value = (sel: string) => page.locator(sel).inputValue()

describe('designer', () => {
  it('signs in and creates a design from the close-packed preset', async () => {
    await signIn(page, baseUrl, designer.email, designer.password)
    pageErrors.length = 0 // the signed-out /api/auth/me probe of the sign-in page answers 401 by design
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await page.getByTestId('new-design').click()
    await page.fill('#new-design-name', `E2E hemispheres ${Date.now()}`)
    await page.getByTestId('preset-hemispheres').check()
    await shot(page, '01-project-new-design')
    await Promise.all([page.waitForURL(/\/designs\//), page.getByTestId('create-design').click()])
    designUrl = page.url()
    await page.getByTestId('lens-radius').waitFor()
    expect(Number(await value('#lens-diameter'))).toBe(10)
    expect(Number(await value('#lens-sag'))).toBe(5)
    expect(Number(await value('#lens-radius'))).toBe(5) // hemisphere: Rc = r
  })

  it('changes the sag and sees the derived radius follow (D 10 µm, h 2.5 µm → Rc 6.25 µm, standard spherical-cap geometry)', async () => {
    await page.locator('#lens-sag').fill('2.5')
    await expect.poll(() => value('#lens-radius')).toBe('6.25')
    await expect.poll(() => page.getByTestId('cross-section-rc').textContent()).toContain('6.25 µm')
    expect(await page.getByTestId('lens-derived').textContent()).toContain('53.1°') // 53.13°, shown to 0.1°
    // radius and sag given: the diameter follows, 2·√(h(2Rc − h)) = 7.416 µm for h 2.5, Rc 4
    await page.locator('#lens-radius').fill('4')
    await expect.poll(() => value('#lens-diameter')).toBe('7.42') // derived lengths shown to 0.01 µm
    // diameter and radius given with Rc < D/2: explained beside the fields, and saving is blocked
    await page.locator('#lens-diameter').fill('10')
    await expect.poll(() => page.getByTestId('lens-problem').textContent()).toMatch(/below half the diameter/)
    expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
    await page.locator('#lens-radius').fill('6.25')
    await page.locator('#lens-radius').blur()
    await expect.poll(() => value('#lens-sag')).toBe('2.5')
    await expect.poll(() => page.getByTestId('lens-problem').count()).toBe(0)
    await shot(page, '02-design-editor')
  })

  it('keeps unsaved changes when leaving the editor and coming back', async () => {
    await page.getByRole('link', { name: '← Project' }).click()
    await page.waitForURL(/\/projects\//)
    await page.goto(designUrl)
    await expect.poll(() => value('#lens-sag')).toBe('2.5')
    expect(await page.getByTestId('design-save').isEnabled()).toBe(true)
    await page.getByTestId('design-save').click()
    await expect.poll(() => page.getByText(/^Version 2/).count()).toBe(1)
    expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
  })

  it('shows the 3-D patch with sample rays, or the 2-D cut with a note when WebGL is missing', async () => {
    await page.getByTestId('view-3d').click()
    await page.waitForFunction(() => !!document.querySelector('[data-testid=patch-3d] canvas') || !!document.querySelector('[data-testid=webgl-missing]'))
    const webgl = (await page.locator('[data-testid=patch-3d] canvas').count()) > 0
    if (webgl) {
      await page.getByTestId('show-rays').check()
      await expect.poll(() => page.getByText(/of 200 sample rays/).count()).toBe(1)
    } else {
      expect(await page.getByTestId('cross-section').count()).toBe(1)
    }
    await shot(page, '03-design-3d')
  })

  it('runs the design, follows the progress bar and reads the headline figures and the polar plot', async () => {
    // the flat-device overlay is the run's own planar companion: no separate flat run is needed
    await page.locator('#run-rays').fill('30000')
    await Promise.all([page.waitForURL(/\/runs\//), page.getByTestId('run-start').click()])
    runUrl = page.url()
    await page.getByTestId('run-progress').waitFor()
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 90_000 })
    const ext = await page.getByTestId('figure-extraction').textContent({ timeout: 30_000 })
    expect(ext).toMatch(/\d+\.\d+ ± \d+\.\d+ %/)
    const gain = await page.getByTestId('figure-enhancement').textContent()
    const m = /(\d+\.\d+) ± (\d+\.\d+) ×/.exec(gain ?? '')
    expect(m).not.toBeNull()
    // shallow caps on 1.5 glass: a gain above 1 (published bands of 1.5–2.2× are for hemispheres: Möller & Forrest 2002; Peng et al. 2005)
    expect(Number(m![1])).toBeGreaterThan(1)
    await page.locator('[data-testid=chart-polar] canvas').first().waitFor()
    await expect.poll(() => page.getByTestId('chart-polar').textContent()).toContain('Flat device: the same stack without lenses')
    await page.locator('[data-testid=chart-map] canvas').first().waitFor()
    await shot(page, '04-run-result')
  })

  it('starts a 3 × 3 sweep of radius against fill factor and sees the heat map fill, infeasible cells explained', async () => {
    await page.goto(designUrl)
    await page.getByTestId('mode-sweep').click()
    await page.locator('#run-rays').fill('20000')
    await page.locator('#axis-0-start').fill('4')
    await Promise.all([page.waitForURL(/\/sweeps\//), page.getByTestId('run-start').click()])
    sweepUrl = page.url()
    await page.locator('[data-testid=sweep-heatmap] canvas').first().waitFor()
    await shot(page, '05-sweep-running')
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 120_000 })
    const rows = page.locator('[data-testid=sweep-table] tbody tr')
    await expect.poll(() => rows.count()).toBe(9)
    await expect.poll(() => page.locator('[data-testid=sweep-table] tbody tr', { hasText: '±' }).count()).toBeGreaterThan(3)
    expect(await page.locator('[data-testid=sweep-table] tbody tr', { hasText: 'infeasible' }).count()).toBeGreaterThan(0)
    expect(await page.getByTestId('sweep-best').textContent()).toMatch(/±/)
    await shot(page, '06-sweep-done')
    await page.locator('[data-testid=sweep-table] tbody tr', { hasText: '±' }).first().click()
    await page.getByTestId('cell-result').waitFor()
    await page.locator('[data-testid=cell-result] [data-testid=chart-polar] canvas').first().waitFor()
    await shot(page, '07-sweep-cell')
  })

  it('compares the run with a sweep cell: both in the table, curves on one plot', async () => {
    const runId = runUrl.split('/').pop()!
    const sweepId = sweepUrl.split('/').pop()!.split('?')[0]!
    await page.goto(`${baseUrl}/compare?project=${projectId}&items=${runId}:0,${sweepId}:0`)
    await expect.poll(() => page.locator('table tbody tr').count()).toBe(2)
    expect(await page.locator('table tbody tr', { hasText: '±' }).count()).toBe(2)
    await page.locator('figure canvas').first().waitFor()
    await shot(page, '07b-compare')
  })

  it('raised no uncaught page errors or console errors', () => {
    expect(pageErrors).toEqual([])
  })
})

describe('viewer', () => {
  it('sees the same pages without edit controls', async () => {
    const v = await launch()
    try {
      const p = await v.browser.newPage()
      await signIn(p, baseUrl, viewer.email, viewer.password)
      await p.goto(`${baseUrl}/projects/${projectId}`)
      await p.getByRole('heading', { name: 'Designs' }).waitFor()
      expect(await p.getByTestId('new-design').count()).toBe(0)
      await shot(p, '08-viewer-project')
      await p.goto(designUrl)
      await p.locator('#lens-sag').waitFor()
      expect(await p.getByTestId('design-save').count()).toBe(0)
      expect(await p.getByTestId('run-start').count()).toBe(0)
      expect(await p.locator('#lens-sag').getAttribute('readonly')).not.toBeNull()
      expect(await p.getByText('You can read this design').count()).toBe(1)
      await shot(p, '09-viewer-design')
      await p.goto(runUrl)
      await p.getByTestId('figure-extraction').waitFor()
      expect(await p.getByRole('button', { name: 'Cancel' }).count()).toBe(0)
      await shot(p, '10-viewer-run')
      await p.setViewportSize({ width: 1920, height: 1080 })
      await p.locator('[data-testid=chart-polar] canvas').first().waitFor()
      await shot(p, '10b-viewer-run-1920')
      await p.setViewportSize({ width: 1280, height: 900 })
      await p.goto(sweepUrl)
      await p.locator('[data-testid=sweep-heatmap] canvas').first().waitFor()
      await shot(p, '11-viewer-sweep')
    } finally {
      await v.close()
    }
  })
})

describe('without WebGL', () => {
  it('the design page falls back to the 2-D cut with a note', async () => {
    const v = await launch(['--disable-webgl', '--disable-3d-apis'])
    try {
      const p = await v.browser.newPage()
      await signIn(p, baseUrl, designer.email, designer.password)
      await p.goto(designUrl)
      await p.getByTestId('view-3d').click()
      await p.getByTestId('webgl-missing').waitFor()
      expect(await p.getByTestId('cross-section').count()).toBe(1)
      await shot(p, '12-no-webgl')
    } finally {
      await v.close()
    }
  })
})
