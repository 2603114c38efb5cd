// Run and sweep names in a real browser: the start panel proposes a name from the design or the axes and the
// reader's time; a designer renames a run on its page; a viewer sees the name but no way to change it; progress
// counts the user's rays. Screenshots go to test-output/e2e/.
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
let runId = ''

beforeAll(async () => {
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
})
afterAll(async () => { await session?.close() })

describe('run names', () => {
  it('the start panel proposes a name from the axes and the time; the run page shows it and the user\'s rays', async () => {
    await signIn(page, baseUrl, designer.email, designer.password)
    pageErrors.length = 0
    const designs = await page.evaluate(async (u) => (await (await fetch(u)).json()).designs, `/api/projects/${projectId}/designs`) as Array<{ id: string; name: string; scenario: { lensArray: unknown, emitter: { thinFilm?: unknown, spectrum?: unknown } } }>
    // a sheet-emitter lens design (other e2e files add stack and spectral designs to the same demo project)
    const lens = designs.find((d) => d.scenario.lensArray && !d.scenario.emitter.thinFilm && !d.scenario.emitter.spectrum)!
    await page.goto(`${baseUrl}/designs/${lens.id}`)
    await page.getByTestId('mode-sweep').click()
    await expect.poll(async () => page.getByTestId('run-name-field').getAttribute('placeholder')).toMatch(/^Radius of curvature × Fill factor, \d{1,2} [A-Z][a-z]{2} \d\d:\d\d$/)
    await page.getByTestId('mode-single').click()
    await expect.poll(async () => page.getByTestId('run-name-field').getAttribute('placeholder')).toMatch(new RegExp(`^${lens.name}, \\d{1,2} [A-Z][a-z]{2} \\d\\d:\\d\\d$`))
    await page.locator('#run-rays').fill('20000')
    await page.getByTestId('run-name-field').fill('Warm stack check')
    await Promise.all([page.waitForURL(/\/runs\//), page.getByTestId('run-start').click()])
    runId = page.url().split('/').pop()!.split('?')[0]!
    expect(await page.getByTestId('run-name').textContent()).toBe('Warm stack check')
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 60_000 })
    expect(await page.getByTestId('run-progress-rays').textContent()).toBe('20,000 of 20,000 rays traced')
  })

  it('a designer renames the run in place; a name that is only spaces is refused before it is sent', async () => {
    await page.getByTestId('run-rename').click()
    await page.getByTestId('run-name-input').fill('   ')
    expect(await page.getByTestId('run-name-save').isEnabled()).toBe(false)
    expect(await page.getByText('Name: name must not be empty.').count()).toBe(1)
    await page.getByTestId('run-name-input').fill('Warm stack, second look')
    await shot(page, '60-run-rename')
    await page.getByTestId('run-name-save').click()
    await expect.poll(() => page.getByTestId('run-name').textContent()).toBe('Warm stack, second look')
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await page.getByRole('link', { name: 'Warm stack, second look' }).first().waitFor()
    expect(pageErrors).toEqual([])
  })

  it('a viewer sees the name and no rename button', async () => {
    const s = await launch()
    try {
      const v = await s.browser.newPage()
      await signIn(v, baseUrl, viewer.email, viewer.password)
      await v.goto(`${baseUrl}/runs/${runId}`)
      await v.getByTestId('run-name').waitFor()
      expect(await v.getByTestId('run-name').textContent()).toBe('Warm stack, second look')
      expect(await v.getByTestId('run-rename').count()).toBe(0)
    } finally { await s.close() }
  })
})
