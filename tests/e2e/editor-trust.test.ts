// The design editor never accepts geometry it cannot trace and can use a measured cap profile (Chromium against
// the built server with the demo data). Screenshots of each state go to test-output/e2e/.
// Reference values: spherical cap Rc = (r² + h²)/(2h) (standard geometry); a measured profile's knots are met
// exactly by its monotone cubic Hermite interpolant (Fritsch & Carlson, SIAM J. Numer. Anal. 17, 238 (1980)).
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
  await page.fill('#new-design-name', `E2E trust ${Date.now()}`)
  await page.getByTestId('preset-hemispheres').check()
  await Promise.all([page.waitForURL(/\/designs\//), page.getByTestId('create-design').click()])
  await page.getByTestId('lens-radius').waitFor()
})
afterAll(async () => { await session?.close() })

const value = (sel: string) => page.locator(sel).inputValue()
const blocked = async () => {
  expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
  expect(await page.getByTestId('run-start').isEnabled()).toBe(false)
  expect(await page.getByTestId('cross-section').count()).toBe(0)
  expect(await page.getByTestId('cross-section-invalid').count()).toBe(1)
}

describe('invalid geometry is refused, shown and kept as typed', () => {
  it('sag −2 µm: field error, unsaved state, save and run blocked, no drawing', async () => {
    await page.locator('#lens-sag').fill('-2')
    await page.locator('#lens-sag').blur()
    await expect.poll(() => page.getByTestId('lens-sag-error').textContent()).toContain('Sag h must be above 0 µm: got -2 µm')
    expect(await page.getByText('Sag h must be above 0 µm').count()).toBe(1) // once, beside the field
    expect(await value('#lens-sag')).toBe('-2') // not replaced by the old sag
    expect(await value('#lens-radius')).toBe('') // no negative Rc derived
    expect(await page.getByTestId('design-dirty').count()).toBe(1)
    await blocked()
    await shot(page, 'editor-01-negative-sag')
  })

  it('sag 0 µm and D −5 µm are refused the same way', async () => {
    await page.locator('#lens-sag').fill('0')
    await expect.poll(() => page.getByTestId('lens-sag-error').textContent()).toContain('Sag h must be above 0 µm: got 0 µm')
    await blocked()
    await page.locator('#lens-sag').fill('5')
    await page.locator('#lens-diameter').fill('-5')
    await page.locator('#lens-diameter').blur()
    await expect.poll(() => page.getByTestId('lens-diameter-error').textContent()).toContain('Base diameter D must be above 0 µm: got -5 µm')
    expect(await value('#lens-diameter')).toBe('-5')
    await blocked()
    await shot(page, 'editor-02-negative-diameter')
  })

  it('an empty or non-numeric field says so and does not snap back on blur', async () => {
    await page.locator('#lens-diameter').fill('10')
    await page.locator('#lens-sag').fill('')
    await page.locator('#lens-sag').blur()
    expect(await value('#lens-sag')).toBe('')
    await expect.poll(() => page.getByTestId('lens-sag-error').textContent()).toMatch(/Enter a value for Sag h \(µm\)/)
    await blocked()
    await page.locator('#substrate-thickness').fill('abc')
    await page.locator('#substrate-thickness').blur()
    expect(await value('#substrate-thickness')).toBe('abc')
    await expect.poll(() => page.getByTestId('substrate-thickness-error').textContent()).toContain('"abc" is not a number')
    await shot(page, 'editor-03-empty-and-text')
    // fixed: hemisphere D 10 µm, h 5 µm → Rc = r = 5 µm; drawing, save and run come back
    await page.locator('#substrate-thickness').fill('700')
    await page.locator('#lens-sag').fill('5')
    await page.locator('#lens-sag').blur()
    await expect.poll(() => value('#lens-radius')).toBe('5')
    await expect.poll(() => page.getByTestId('cross-section').count()).toBe(1)
    expect(await page.getByTestId('design-save').isEnabled()).toBe(true)
  })
})

describe('measured cap profile', () => {
  it('is picked from the project\'s uploaded profiles and drawn as measured', async () => {
    // an invented flat-topped trace: ρ 0…5 µm, heights 2 → 0 µm, so D 10 µm and h 2 µm; at ρ = 2.5 µm the
    // height above the rim is 1.75 µm (a knot), where a spherical cap of the same D and h has 1.555 µm
    const name = `E2E flat top ${Date.now()}`
    const csv = 'r_um,height_um\n0,2\n1.25,1.95\n2.5,1.75\n3.75,1\n5,0\n'
    const up = await page.request.post(`${baseUrl}/api/projects/${projectId}/tables?kind=lens_profile&name=${encodeURIComponent(name)}&fileName=flat-top.csv`, {
      data: csv, headers: { 'content-type': 'text/csv', origin: baseUrl },
    })
    expect(up.status()).toBe(201)
    await page.reload()
    await page.getByTestId('lens-shape').waitFor()
    await page.getByTestId('lens-shape').selectOption('measured')
    await expect.poll(() => page.getByTestId('lens-measured').textContent()).toContain('Measured profile is required for a measured cap: pick an uploaded lens profile')
    expect(await page.getByTestId('design-save').isEnabled()).toBe(false)
    await expect.poll(() => page.locator('#lens-profile-table option').allTextContents()).toContain(`${name} (5 points)`)
    await page.getByTestId('lens-profile-table').selectOption({ label: `${name} (5 points)` })
    await expect.poll(() => value('#lens-sag')).toBe('2')
    expect(await value('#lens-diameter')).toBe('10')
    expect(await page.locator('#lens-radius').count()).toBe(0)
    expect(await page.getByTestId('lens-measured').textContent()).toContain('D stretches it across')
    await expect.poll(() => page.getByTestId('cross-section').count()).toBe(1)
    // middle cap: 49 points from ρ = −a to +a; point 24 is the vertex, point 36 is ρ = a/2
    const pts = (await page.locator('[data-testid=cross-section] polygon').nth(1).getAttribute('points'))!.trim().split(' ').map((p) => Number(p.split(',')[1]))
    const base = pts[0]!
    const ratio = (base - pts[36]!) / (base - pts[24]!)
    expect(ratio).toBeCloseTo(1.75 / 2, 2)
    await shot(page, 'editor-04-measured-profile')
    await page.getByTestId('design-save').click()
    await expect.poll(() => page.getByText(/^Version 2/).count()).toBe(1)
    await page.reload()
    await expect.poll(() => value('#lens-shape')).toBe('measured')
    expect(await page.getByTestId('lens-profile-table').locator('option').first().textContent()).toContain('Profile in this design (5 points)')
    await page.getByTestId('view-3d').click()
    await page.waitForFunction(() => !!document.querySelector('[data-testid=patch-3d] canvas') || !!document.querySelector('[data-testid=webgl-missing]'))
    await shot(page, 'editor-05-measured-3d')
    expect(pageErrors).toEqual([])
  })
})

describe('pixel source run page', () => {
  it('headlines the pixel figures and offers every export, each of which parses back', async () => {
    await page.goto(`${baseUrl}/projects/${projectId}`)
    await page.getByTestId('new-design').click()
    await page.fill('#new-design-name', `E2E pixel ${Date.now()}`)
    await page.getByTestId('preset-hemispheres').check()
    await Promise.all([page.waitForURL(/\/designs\//), page.getByTestId('create-design').click()])
    await page.getByTestId('lens-radius').waitFor()
    await page.locator('#emitter-source').selectOption('disc')
    await expect.poll(() => value('#source-radius')).toBe('20')
    await page.getByTestId('design-save').click()
    await expect.poll(() => page.getByText(/^Version 2/).count()).toBe(1)
    // a pixel source offers the pixel figure for ranking a sweep
    await page.getByTestId('mode-sweep').click()
    await expect.poll(() => page.locator('#sweep-figure option[value=pixelOnAxisGain]').count()).toBe(1)
    // the sweep form checks every field with the server's rules before submit; Start stays disabled meanwhile
    await page.locator('#run-rays').fill('20000')
    await page.locator('#axis-0-param').selectOption('emitter.source.radiusUm')
    await page.locator('#axis-0-steps').fill('0')
    await expect.poll(() => page.getByTestId('sweep-problems').textContent()).toContain('Axis 1 Steps must be at least 1')
    expect(await page.getByTestId('run-start').isEnabled()).toBe(false)
    await page.locator('#axis-0-steps').fill('3')
    await page.locator('#axis-0-start').fill('')
    await expect.poll(() => page.getByTestId('sweep-problems').textContent()).toContain('Axis 1 From is empty or not a number')
    expect(await page.getByTestId('run-start').isEnabled()).toBe(false)
    await page.locator('#axis-0-start').fill('10')
    await page.locator('#axis-0-steps').fill('50')
    await page.locator('#axis-1-steps').fill('50')
    await expect.poll(() => page.getByTestId('sweep-problems').textContent()).toContain('2500 cells, max 400')
    expect(await page.getByTestId('run-start').isEnabled()).toBe(false)
    await shot(page, 'editor-07-sweep-form-invalid')
    await page.locator('#axis-1-steps').fill('3')
    await page.locator('#axis-0-steps').fill('3')
    await expect.poll(() => page.getByTestId('sweep-problems').count()).toBe(0)
    expect(await page.getByTestId('run-start').isEnabled()).toBe(true)
    await page.getByTestId('mode-single').click()
    await page.locator('#run-rays').fill('20000')
    await Promise.all([page.waitForURL(/\/runs\//), page.getByTestId('run-start').click()])
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 120_000 })
    // progress counts the user's rays (the engine traces each with its flat-device twin, 40,000 in all)
    expect(await page.getByTestId('run-progress-rays').textContent()).toBe('20,000 of 20,000 rays traced')
    const pixel = await page.getByTestId('figure-pixel-on-axis').textContent({ timeout: 30_000 })
    expect(pixel).toMatch(/\d+\.\d+ ± \d+\.\d+ ×/)
    expect(await page.getByTestId('figure-enhancement').textContent()).toContain('Whole-film gain')
    // the pixel block comes before the whole-film figures
    const order = await page.evaluate(() => {
      const a = document.querySelector('[data-testid=figure-pixel]')!, b = document.querySelector('[data-testid=figure-enhancement]')!
      return a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING
    })
    expect(order).toBeTruthy()
    await shot(page, 'editor-06-pixel-run')

    const href = async (id: string) => (await page.getByTestId(id).getAttribute('href'))!
    const get = async (id: string) => { const r = await page.request.get(`${baseUrl}${await href(id)}`); expect(r.status()).toBe(200); return r }
    const json = await (await get('export-json')).json()
    expect(json.result.pixel.onAxisEnhancement).toBeGreaterThan(0)
    expect(json.cell).toBeTruthy()
    const csv = await (await get('export-csv')).text()
    expect(csv.split('\n').length).toBeGreaterThan(10)
    const sag = (await (await get('export-sag')).text()).trim().split('\n').filter((l) => /^[\d.]/.test(l))
    expect(sag.length).toBe(201)
    // hemisphere D 10 µm, h 5 µm (R 5 µm): depth below the vertex s = R − √(R² − ρ²): 1 µm at ρ = 3 µm (row 120
    // of 0…200), 5 µm at the rim ρ = 5 µm (columns r_um, height_um, sag_um; standard geometry)
    const row = (i: number) => sag[i]!.split(',').map(Number)
    expect(row(120)[0]).toBeCloseTo(3, 6)
    expect(row(120)[2]).toBeCloseTo(1, 6)
    expect(row(200)[0]).toBeCloseTo(5, 6)
    expect(row(200)[2]).toBeCloseTo(5, 6)
    const stl = await (await get('export-stl')).body()
    // binary STL: 80-byte header, uint32 triangle count, 50 bytes per triangle
    const triangles = stl.readUInt32LE(80)
    expect(triangles).toBeGreaterThan(0)
    expect(stl.length).toBe(84 + 50 * triangles)
    expect(pageErrors).toEqual([])
  })
})
