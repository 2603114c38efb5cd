// A finite panel in a real browser (Chromium against the built server with its embedded worker and the demo data):
// the editor's Panel and measurement section with the schema's field-named messages beside its fields, then a traced
// run whose result page says what was measured and shows the detector's reading, the measured gain and the edge
// channel, each with σ and unit. Screenshots go to test-output/e2e/.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { DEMO_USERS } from '../../server/utils/demo'
import { collectErrors, launch, shot, signIn, type Page } from './browser'

const baseUrl = inject('e2eBaseUrl')
const projectId = inject('e2eProjectId')
const designer = DEMO_USERS.find((u) => u.role === 'designer')!

let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []

beforeAll(async () => {
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
  await signIn(page, baseUrl, designer.email, designer.password)
  pageErrors.length = 0 // the signed-out /api/auth/me probe of the sign-in page answers 401 by design
  await page.goto(`${baseUrl}/projects/${projectId}`)
  await page.getByTestId('new-design').click()
  await page.fill('#new-design-name', `E2E panel ${Date.now()}`)
  await page.getByTestId('preset-hemispheres').check()
  await Promise.all([page.waitForURL(/\/designs\//), page.getByTestId('create-design').click()])
  await page.getByTestId('lens-radius').waitFor()
})
afterAll(async () => { await session?.close() })

describe('finite panel: editor and result', () => {
  it('the panel section gives field-named messages beside its fields and blocks saving until they are fixed', async () => {
    await page.getByTestId('panel-toggle').check()
    await page.locator('#panel-width').fill('0')
    await expect.poll(() => page.getByTestId('panel-width-error').textContent()).toBe('Panel width must be above 0 mm: got 0 mm')
    expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
    await page.locator('#panel-width').fill('8')
    await page.locator('#panel-height').fill('8')
    await page.getByTestId('panel-detector').selectOption('goniometer')
    await page.locator('#panel-spot-x').fill('6')
    await expect.poll(() => page.getByTestId('panel-spot-x-error').textContent()).toMatch(/^Spot centre must lie on the panel \(\|x\| ≤ 4 mm/)
    expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
    await page.locator('#panel-spot-x').fill('0')
    await page.locator('#panel-spot-diameter').fill('4')
    await page.locator('#panel-spot-diameter').blur()
    await expect.poll(() => page.getByTestId('panel-spot-x-error').count()).toBe(0)
    await shot(page, 'panel-01-editor')
    await expect.poll(() => page.getByTestId('design-save').isEnabled()).toBe(true)
    await page.getByTestId('design-save').click()
    await expect.poll(() => page.getByText(/^Version 2/).count()).toBe(1)
  })

  it('a run says what it measured and shows the reading, the measured gain and the edge share with σ and units', async () => {
    await page.getByTestId('run-rays').fill('20000')
    await Promise.all([page.waitForURL(/\/runs\//), page.getByTestId('run-start').click()])
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 120_000 })
    const measures = await page.getByTestId('panel-measures').textContent({ timeout: 30_000 })
    expect(measures).toContain('Goniometer with a field stop: light leaving the front face inside a 4 mm spot at (0, 0) mm of the 8 × 8 mm panel')
    expect(await page.getByTestId('figure-panel-measured').textContent()).toMatch(/\d ± [\d.]+ × Lamb\./)
    expect(await page.getByTestId('figure-panel-gain').textContent()).toMatch(/\d ± [\d.]+ ×/)
    expect(await page.getByTestId('figure-panel-edge').textContent()).toMatch(/[\d.]+ ± [\d.]+ %.*absorbing/)
    await page.locator('[data-testid=chart-panel-spot] canvas').first().waitFor()
    expect(await page.getByTestId('settings-panel').textContent()).toContain('8 mm × 8 mm, absorbing edges, detector goniometer')
    await shot(page, 'panel-02-result')
    expect(pageErrors).toEqual([])
  })
})
