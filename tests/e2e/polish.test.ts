// The small things that cost trust, in Chromium against the built server and the demo data: a signed-out page sends
// no request that can only answer 401, the editor fits a 390 px phone, dates are <time> elements in the reader's
// locale with the ISO time as tooltip, a viewer sees no upload form, the run form states the one ray limit, and the
// 3-D preview keeps its camera above the emitter plane, resets it, and draws the pixel footprint.
// Screenshots go to test-output/e2e/.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO_USERS } from '../../server/utils/demo'
import { DEMO_RUN } from '../../server/utils/demo-results'
import { collectErrors, launch, shot, signIn, type Page } from './browser'

const baseUrl = inject('e2eBaseUrl')
const projectId = inject('e2eProjectId')
const designer = DEMO_USERS.find((u) => u.role === 'designer')!
const viewer = DEMO_USERS.find((u) => u.role === 'viewer')!

let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []
const unauthorized: string[] = []

const hydrated = (p: Page) => p.waitForFunction(() => !!(document.querySelector('#__nuxt') as any)?.__vue_app__)

beforeAll(async () => {
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
  page.on('dialog', (d) => d.accept())
  page.on('response', (r) => { if (r.status() === 401) unauthorized.push(`${r.request().method()} ${r.url()}`) })
})
afterAll(async () => { await session?.close() })

describe('signed-out pages', () => {
  it('sign-in, sign-up and reset-password load and hydrate without a 401 or a console error', async () => {
    await page.goto(`${baseUrl}/sign-in`)
    await hydrated(page)
    await page.locator('button[type=submit]:not([disabled])').waitFor()
    // client-side navigation too: the route middleware runs again in the browser
    await Promise.all([page.waitForURL(/\/sign-up/), page.getByRole('link', { name: 'Create one' }).click()])
    await page.locator('button[type=submit]:not([disabled])').waitFor()
    await page.goto(`${baseUrl}/reset-password`)
    await hydrated(page)
    await Promise.all([page.waitForURL(/\/sign-in/), page.getByRole('link', { name: 'Back to sign-in' }).click()])
    await page.locator('button[type=submit]:not([disabled])').waitFor()
    await shot(page, 'polish-01-sign-in-clean-console')
    expect(unauthorized).toEqual([])
    expect(pageErrors).toEqual([])
  })
})

describe('signed in as a designer', () => {
  let designUrl = ''
  beforeAll(async () => {
    await signIn(page, baseUrl, designer.email, designer.password)
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await hydrated(page)
    await page.getByTestId('new-design').click()
    await page.fill('#new-design-name', `E2E polish ${Date.now()}`)
    await page.getByTestId('preset-hemispheres').check()
    await Promise.all([page.waitForURL(/\/designs\//), page.getByTestId('create-design').click()])
    await page.getByTestId('lens-radius').waitFor()
    await hydrated(page)
    designUrl = page.url()
  })

  it('the run form states one ray limit in the user\'s rays: 1 000 000 000 for a lens design over an extended source (its flat companion by quadrature costs no rays)', async () => {
    expect(await page.getByTestId('run-rays-hint').textContent()).toContain('at most 1,000,000,000')
    await page.locator('#run-rays').fill('1000000001')
    await expect.poll(() => page.getByTestId('run-rays-limit').textContent()).toContain('from 1,000 to 1,000,000,000')
    expect(await page.getByTestId('run-rays-limit').textContent()).not.toContain('traced twice')
    expect(await page.getByTestId('run-start').isEnabled()).toBe(false)
    await page.locator('#run-rays').fill('200000')
  })

  it('3-D preview: Reset view restores the camera, which never goes below the emitter plane; the disc footprint is drawn', async () => {
    await page.locator('#emitter-source').selectOption('disc')
    await page.locator('#source-radius').waitFor()
    await page.getByTestId('view-3d').click()
    await page.locator('[data-testid=patch-3d] canvas').waitFor() // SwiftShader draws WebGL headless
    const host = page.getByTestId('patch-3d')
    await expect.poll(() => host.getAttribute('data-footprint')).toBe('disc')
    expect(await page.getByTestId('patch-3d-footprint').textContent()).toContain('source disc, radius 20.00 µm on the emitter plane')
    const home = (await host.getAttribute('data-camera'))!
    expect(home).toMatch(/^-?\d+\.\d\d,-?\d+\.\d\d,-?\d+\.\d\d$/)
    expect(await host.getAttribute('data-camera-home')).toBe(home)
    expect(await page.getByTestId('view-reset').isDisabled()).toBe(true)
    // as low as it goes: 20 presses of "Lower" (10° each) would pass the horizon twice over without the floor
    for (let i = 0; i < 20; i++) await page.getByTestId('view-lower').click()
    const low = (await host.getAttribute('data-camera'))!.split(',').map(Number)
    expect(low[2]!).toBeGreaterThan(0)
    await page.getByTestId('view-turn-clockwise').click()
    await page.getByTestId('view-closer').click()
    // a drag turns the view too
    const box = (await page.locator('[data-testid=patch-3d] canvas').boundingBox())!
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2)
    await page.mouse.down()
    await page.mouse.move(box.x + box.width / 2 + 120, box.y + box.height / 2 + 40, { steps: 6 })
    await page.mouse.up()
    const moved = (await host.getAttribute('data-camera'))!
    expect(moved).not.toBe(home)
    expect(Number(moved.split(',')[2])).toBeGreaterThan(0)
    await shot(page, 'polish-02-3d-turned-low')
    await page.getByTestId('view-reset').click()
    await expect.poll(() => host.getAttribute('data-camera')).toBe(home)
    await shot(page, 'polish-03-3d-reset-disc-footprint')
    // a rectangle pixel is drawn as such
    await page.locator('#emitter-source').selectOption('rectangle')
    await expect.poll(() => host.getAttribute('data-footprint')).toBe('rectangle')
    expect(await page.getByTestId('patch-3d-footprint').textContent()).toContain('pixel 40.00 µm × 40.00 µm')
    await page.locator('#emitter-source').selectOption('extended')
    await expect.poll(() => host.getAttribute('data-footprint')).toBe('none')
    if (await page.getByRole('button', { name: 'Discard changes' }).isEnabled()) await page.getByRole('button', { name: 'Discard changes' }).click()
  })

  it('the editor (and a run and a sweep page) fit a 390 × 844 phone: no horizontal scroll, header and actions visible', async () => {
    await page.setViewportSize({ width: 390, height: 844 })
    await page.goto(designUrl)
    await hydrated(page)
    await page.getByTestId('design-save').waitFor()
    const width = await page.evaluate(() => document.scrollingElement!.scrollWidth)
    expect(width).toBeLessThanOrEqual(390)
    for (const id of ['app-header', 'design-header-actions']) {
      const b = (await page.getByTestId(id).boundingBox())!
      expect(b.x).toBeGreaterThanOrEqual(0)
      expect(b.x + b.width).toBeLessThanOrEqual(390)
    }
    await shot(page, 'polish-04-editor-390px')
    // the pages a result opens on fit too: the demo run and sweep (charts and tables scroll inside their panels)
    const list = await page.evaluate(async (u) => (await fetch(u)).json(), `/api/runs?projectId=${projectId}`) as { runs: Array<{ id: string; kind: string; name: string }> }
    for (const kind of ['single', 'sweep']) {
      const r = list.runs.find((x) => x.kind === kind)!
      await page.goto(`${baseUrl}/${kind === 'sweep' ? 'sweeps' : 'runs'}/${r.id}`)
      await hydrated(page)
      await page.locator('figure canvas').first().waitFor()
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth), `${kind} page at 390 px`).toBeLessThanOrEqual(390)
      await shot(page, `polish-04-${kind}-390px`)
    }
    await page.setViewportSize({ width: 1280, height: 900 })
  })

  it('dates are <time> elements: the reader\'s locale shown, the ISO time as tooltip and datetime (run page, project page)', async () => {
    const list = await page.evaluate(async (u) => (await fetch(u)).json(), `/api/runs?projectId=${projectId}`) as { runs: Array<{ id: string; name: string; createdAt: string }> }
    const run = list.runs.find((r) => r.name === DEMO_RUN.name)!
    expect(run).toBeTruthy()
    await page.goto(`${baseUrl}/runs/${run.id}`)
    await hydrated(page)
    const started = page.getByTestId('run-started')
    expect(await started.evaluate((e) => e.tagName)).toBe('TIME')
    const iso = new Date(run.createdAt).toISOString()
    expect(await started.getAttribute('datetime')).toBe(iso)
    expect(await started.getAttribute('title')).toBe(iso)
    const locale = await page.evaluate(() => navigator.language)
    const expected = new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeStyle: 'short' }).format(new Date(iso))
    await expect.poll(() => started.textContent()).toBe(expected)
    await shot(page, 'polish-05-run-page-time')
    // the project page: shortlist, runs list and tables carry the same element, and no date is written otherwise
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await hydrated(page)
    await page.getByText('Shortlist').first().waitFor()
    const times = await page.locator('time[datetime]').evaluateAll((ts) => ts.map((t) => [t.getAttribute('datetime'), t.getAttribute('title'), t.textContent]))
    expect(times.length).toBeGreaterThan(2)
    for (const [dt, title, text] of times) {
      expect(Number.isNaN(Date.parse(dt!))).toBe(false)
      expect(title).toBe(dt)
      expect(text).not.toMatch(/Invalid/)
    }
    expect(pageErrors).toEqual([])
  })
})

describe('signed in as a viewer', () => {
  it('the project page shows no upload form, and no empty "Measured data" section', async () => {
    const other = await launch()
    try {
      const p = await other.browser.newPage()
      const errs: string[] = []
      collectErrors(p, errs)
      await signIn(p, baseUrl, viewer.email, viewer.password)
      await p.goto(`${baseUrl}/projects/${projectId}`)
      await hydrated(p)
      await p.getByText('Shortlist').first().waitFor()
      expect(await p.getByTestId('tables-upload').count()).toBe(0)
      const tables = await p.evaluate(async (u) => (await fetch(u)).json(), `/api/projects/${projectId}/tables`) as { tables: unknown[] }
      // the section is there only to list tables the viewer can read
      expect(await p.getByTestId('tables-panel').count()).toBe(tables.tables.length ? 1 : 0)
      if (tables.tables.length) expect(await p.getByTestId('tables-panel').locator('li').count()).toBe(tables.tables.length)
      await shot(p, 'polish-06-viewer-project')
      expect(errs).toEqual([])
    } finally { await other.close() }
  })
})
