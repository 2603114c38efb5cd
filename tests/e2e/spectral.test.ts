// Spectrum and materials in the design editor, in a real browser: a Gaussian emission band and a Sellmeier lens,
// live field errors in the trade's words for a Sellmeier formula that has no index ≥ 1 inside the spectrum and for
// a negative wavelength (Save disabled meanwhile), the n(λ) plot, the Fresnel mode, then an uploaded emission
// spectrum picked by reference. Screenshots go to test-output/e2e/.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { collectErrors, launch, shot, signIn, type Page } from './browser'
import { colourResultFixture } from '../fixtures/colour-result'

const baseUrl = inject('e2eBaseUrl')
let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []
const stamp = Date.now().toString(36)
const lead = { email: `spectral.${stamp}@e2e.example`, name: 'Ines Marlow', password: 'pw-e2e-spectral-correct-horse' }
let cookie = ''
let projectId = ''
let designId = ''

async function api(method: string, path: string, body?: unknown) {
  const headers: Record<string, string> = { origin: baseUrl, accept: 'application/json' }
  if (cookie) headers.cookie = cookie
  if (body !== undefined) headers['content-type'] = 'application/json'
  const res = await fetch(baseUrl + path, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) })
  const set = res.headers.getSetCookie().find((c) => c.startsWith('lensfield_session='))
  return { status: res.status, body: await res.json().catch(() => null), cookie: set?.split(';')[0] }
}

// Invented: the green sub-pixel of the demo panel maker's line, measured on their bench spectrometer.
const greenCsv = '# bench spectrometer, 1 nm slit\nwavelength_nm,intensity\n480,0\n500,0.18\n515,0.62\n528,1\n540,0.71\n560,0.25\n600,0.03\n620,0\n'

async function hydrated() {
  await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
}
async function openEditor() {
  await page.goto(`${baseUrl}/designs/${designId}`)
  await page.getByTestId('design-light').waitFor()
  await hydrated()
}
const saveDisabled = () => page.getByTestId('design-save').isDisabled()

beforeAll(async () => {
  const up = await api('POST', '/api/auth/sign-up', lead)
  expect(up.status).toBe(201)
  cookie = up.cookie!
  const p = await api('POST', '/api/projects', { teamId: up.body.teamId, name: `Green sub-pixel film ${stamp}` })
  expect(p.status).toBe(201)
  projectId = p.body.project.id
  const d = await api('POST', `/api/projects/${projectId}/designs`, {
    name: 'Green film, resin caps',
    scenario: {
      emitter: { index: 1.8 }, reflector: { reflectance: 0.9 }, substrate: { index: 1.5, thicknessUm: 500 },
      lensArray: { lattice: 'hexagonal', pitchUm: 12, diameterUm: 12, sagUm: 5, index: 1.55 }, trace: { rays: 200000, fresnel: 'polarized' },
    },
  })
  expect(d.status).toBe(201)
  designId = d.body.design.id
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
  await signIn(page, baseUrl, lead.email, lead.password)
  pageErrors.length = 0 // the signed-out /api/auth/me probe of the sign-in page answers 401 by design
})
afterAll(async () => { await session?.close() })

describe('spectrum and materials in the editor', () => {
  it('a negative wavelength is named beside the field and blocks saving', async () => {
    await openEditor()
    await page.getByTestId('spectrum-kind').selectOption('line')
    await page.getByTestId('spectrum-line').fill('-530')
    await expect.poll(() => page.getByTestId('spectrum-line-error').textContent()).toBe('Emission wavelength must be at least 200 nm: got -530 nm')
    expect(await saveDisabled()).toBe(true)
    await shot(page, 'spectral-01-negative-wavelength')
  })

  it('a Gaussian band and a Sellmeier lens; a formula without n ≥ 1 inside the band is refused live', async () => {
    await page.getByTestId('spectrum-kind').selectOption('gaussian')
    await page.getByTestId('spectrum-peak').fill('530')
    await page.getByTestId('spectrum-fwhm').fill('40')
    await expect.poll(() => page.getByTestId('spectrum-peak-error').count()).toBe(0)
    await page.getByTestId('lens-index-kind').selectOption('sellmeier')
    // the N-BK7 starting values are valid: the n(λ) plot shows, saving is allowed
    await page.getByTestId('lens-index-plot').waitFor()
    expect(await saveDisabled()).toBe(false)
    // C1 = 0.3 µm² puts a pole at 548 nm, inside 410–650 nm (peak ± 3 FWHM): n² < 0 or n < 1 there
    await page.getByTestId('lens-index-c1').fill('0.3')
    await expect.poll(() => page.getByTestId('lens-index-error').textContent()).toMatch(/^Lens index: the Sellmeier formula gives n = (no real value|0\.\d+) at [\d.]+ nm, inside the spectrum's range \(n must be 1–4\)/)
    expect(await saveDisabled()).toBe(true)
    await shot(page, 'spectral-02-sellmeier-below-one')
    await page.getByTestId('lens-index-c1').fill('0.00600069867')
    await expect.poll(() => page.getByTestId('lens-index-error').count()).toBe(0)
    expect(await page.getByTestId('trace-fresnel').inputValue()).toBe('polarized')
    expect(await page.getByTestId('trace-fresnel-note').textContent()).toContain('s and p')
    await shot(page, 'spectral-03-gaussian-sellmeier')
    await page.getByTestId('design-save').click()
    await expect.poll(async () => (await api('GET', `/api/designs/${designId}`)).body.design.version).toBe(2)
    const saved = (await api('GET', `/api/designs/${designId}`)).body.design.scenario
    expect(saved.emitter.spectrum).toEqual({ peakNm: 530, fwhmNm: 40 })
    expect(saved.lensArray.index).toEqual({ sellmeier: { B: [1.03961212, 0.231792344, 1.01046945], C: [0.00600069867, 0.0200179144, 103.560653] } })
  })

  it('an uploaded emission spectrum is picked by reference and saved', async () => {
    await page.goto(`${baseUrl}/projects/${projectId}`)
    const input = page.locator('input[type=file]')
    await input.waitFor()
    await hydrated()
    await page.locator('select').filter({ has: page.locator('option[value=emission_spectrum]') }).selectOption('emission_spectrum')
    await page.getByPlaceholder('defaults to the file name').fill('Green sub-pixel G2')
    await input.setInputFiles({ name: 'green-g2.csv', mimeType: 'text/csv', buffer: Buffer.from(greenCsv) })
    await page.getByRole('button', { name: 'Upload' }).click()
    await page.getByText('Green sub-pixel G2').waitFor()
    await shot(page, 'spectral-04-spectrum-uploaded')
    await openEditor()
    await page.getByTestId('spectrum-kind').selectOption('table')
    await page.getByTestId('spectrum-table').selectOption({ label: 'Green sub-pixel G2 (8 rows)' })
    await page.getByText('8 rows, 480–620 nm, peak at 528 nm').waitFor()
    await expect.poll(() => saveDisabled()).toBe(false)
    await shot(page, 'spectral-05-spectrum-picked')
    await page.getByTestId('design-save').click()
    await expect.poll(async () => (await api('GET', `/api/designs/${designId}`)).body.design.version).toBe(3)
    const saved = (await api('GET', `/api/designs/${designId}`)).body.design.scenario
    const tables = (await api('GET', `/api/projects/${projectId}/tables`)).body.tables
    expect(saved.emitter.spectrum).toEqual({ tableId: tables.find((t: { name: string }) => t.name === 'Green sub-pixel G2').id })
    expect(pageErrors).toEqual([])
  })

  it('a traced run of it shows colour over angle (colour numbers from the contract-shaped fixture where the result has none)', async () => {
    const run = await api('POST', '/api/runs', { designId, precision: { rays: 20000 } })
    expect(run.status, JSON.stringify(run.body)).toBe(201)
    const runId = run.body.run.id as string
    // the run stores the uploaded spectrum's rows, not the reference
    expect(run.body.run.baseScenario.emitter.spectrum.table).toHaveLength(8)
    await expect.poll(async () => (await api('GET', `/api/runs/${runId}`)).body.run.status, { timeout: 180_000, interval: 1000 }).toBe('done')
    // Until the engine writes result.colour, the browser's copy of the cell gets the fixture's colour blocks
    // (tests/fixtures/colour-result.ts: invented numbers of the colourSchema shape) so the charts draw.
    const fixture = colourResultFixture()
    await page.route('**/api/runs/*/cells/0', async (route) => {
      const res = await route.fetch()
      const body = await res.json()
      if (body.result && !body.result.colour) {
        Object.assign(body.result, {
          colour: fixture.colour, planarColour: fixture.planarColour,
          photopicOnAxisGain: fixture.photopicOnAxisGain, photopicOnAxisGainStdErr: fixture.photopicOnAxisGainStdErr,
        })
      }
      await route.fulfill({ response: res, json: body })
    })
    await openEditor()
    // client-side navigation, so the cell is fetched by the browser (a server-rendered page fetches it on the server)
    await page.evaluate((id) => (document.querySelector('#__nuxt') as unknown as { __vue_app__: { config: { globalProperties: { $router: { push: (p: string) => Promise<void> } } } } }).__vue_app__.config.globalProperties.$router.push(`/runs/${id}`), runId)
    await page.getByTestId('colour-result').waitFor({ timeout: 60_000 })
    for (const id of ['chart-chromaticity', 'chart-delta-uv', 'chart-spectra', 'chart-photopic']) await page.getByTestId(id).locator('canvas').first().waitFor()
    expect(await page.getByTestId('figure-max-duv').textContent()).toMatch(/Largest colour shift 0–60° \(Δu′v′\)0\.\d+ ± 0\.\d+flat device 0\.\d+ ± 0\.\d+/)
    expect(await page.getByTestId('figure-photopic').textContent()).toContain('× Lamb.')
    await shot(page, 'spectral-06-colour-result')
    await page.getByTestId('chromaticity-zoom').uncheck()
    await page.getByTestId('chart-chromaticity').scrollIntoViewIfNeeded()
    await shot(page, 'spectral-07-chromaticity-whole-diagram')
    await page.unroute('**/api/runs/*/cells/0')
    expect(pageErrors).toEqual([])
  })
})
