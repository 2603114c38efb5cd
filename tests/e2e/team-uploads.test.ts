// A lead's own team in a real browser: a noisy stylus trace is fitted at upload and traced; the shortlist asks
// before the chosen mark moves and its history names the entries; the team page changes roles, refuses to demote
// the last lead, removes a member and withdraws an invitation. Screenshots go to test-output/e2e/.
import pg from 'pg'
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest'
import { collectErrors, launch, shot, signIn, type Page } from './browser'

const baseUrl = inject('e2eBaseUrl')
const pool = new pg.Pool({ connectionString: inject('e2eDatabaseUrl'), max: 2 })
let session: Awaited<ReturnType<typeof launch>>
let page: Page
const pageErrors: string[] = []
const stamp = Date.now().toString(36)
const lead = { email: `lead.${stamp}@e2e.example`, name: 'Wren Aldous', password: 'pw-e2e-lead-correct-horse' }
const member = { email: `member.${stamp}@e2e.example`, name: 'Odile Brack', password: 'pw-e2e-member-correct-horse' }
let leadCookie = ''
let teamId = ''
let projectId = ''
const runIds: string[] = []

async function api(method: string, path: string, body?: unknown, raw?: { text: string, type: string }) {
  const headers: Record<string, string> = { origin: baseUrl, accept: 'application/json' }
  if (leadCookie) headers.cookie = leadCookie
  if (body !== undefined) headers['content-type'] = 'application/json'
  if (raw) headers['content-type'] = raw.type
  const res = await fetch(baseUrl + path, { method, headers, body: raw ? raw.text : body === undefined ? undefined : JSON.stringify(body) })
  const set = res.headers.getSetCookie().find((c) => c.startsWith('lensfield_session='))
  const json = await res.json().catch(() => null)
  return { status: res.status, body: json, cookie: set?.split(';')[0] }
}

// Spherical cap R = 10 µm cut at a = 5 µm (sag R − √(R² − a²) = 1.340 µm, standard cap geometry) with a fixed
// ±2 nm ripple and a 2 nm rise at the rim: profilometer noise of that size is common practice.
const sphere = (r: number) => Math.sqrt(100 - r * r) - Math.sqrt(75)
const traceCsv = (bump = 0) => 'r_um,height_um\n' + Array.from({ length: 51 }, (_, i) => {
  const r = (5 * i) / 50
  return `${r.toFixed(3)},${(Math.max(0, sphere(r) + (i % 2 ? 0.002 : -0.002)) + (i === 50 ? 0.004 : 0) + (r > 3 && r < 4 ? bump : 0)).toFixed(6)}`
}).join('\n') + '\n'

beforeAll(async () => {
  const up = await api('POST', '/api/auth/sign-up', lead)
  expect(up.status).toBe(201)
  leadCookie = up.cookie!
  teamId = up.body.teamId
  const m = await api('POST', '/api/auth/sign-up', member)
  expect(m.status).toBe(201)
  await pool.query(`INSERT INTO memberships (team_id, user_id, role) VALUES ($1, $2, 'viewer')`, [teamId, m.body.user.id])
  const p = await api('POST', '/api/projects', { teamId, name: `Stylus study ${stamp}` })
  expect(p.status).toBe(201)
  projectId = p.body.project.id
  session = await launch()
  page = await session.browser.newPage()
  collectErrors(page, pageErrors)
  await signIn(page, baseUrl, lead.email, lead.password)
  pageErrors.length = 0 // the signed-out /api/auth/me probe of the sign-in page answers 401 by design
})
afterAll(async () => {
  await session?.close()
  await pool.end()
})

async function pickTrace(csv: string, fileName: string) {
  await page.goto(`${baseUrl}/projects/${projectId}`)
  const input = page.locator('input[type=file]')
  await input.waitFor()
  // The server-rendered input is there before the page is interactive, and a file picked before hydration reaches no
  // handler (seen once in a clean-clone run): wait for the mounted app, then pick again if the fit panel stays away.
  await page.waitForFunction(() => !!(document.querySelector('#__nuxt') as { __vue_app__?: unknown } | null)?.__vue_app__)
  for (let attempt = 1; ; attempt++) {
    await input.setInputFiles({ name: fileName, mimeType: 'text/csv', buffer: Buffer.from(csv) })
    try {
      await page.getByTestId('trace-fit').waitFor({ timeout: 5000 })
      return
    } catch (err) {
      if (attempt === 3) throw err
    }
  }
}

describe('a noisy stylus trace', () => {
  it('is offered with a fit (raw vs fitted, RMS residual in nm) and stored fitted', async () => {
    await pickTrace(traceCsv(), 'cap-stylus.csv')
    // As uploaded it would be refused (a 2 nm rise), so the isotonic fit is preselected.
    expect(await page.locator('input[type=radio][value=none]').isDisabled()).toBe(true)
    await expect.poll(() => page.getByTestId('fit-residual').textContent()).toMatch(/RMS residual \d+\.\d+ nm/)
    await page.locator('[data-testid=chart-trace-fit] canvas').first().waitFor()
    await shot(page, 'uploads-01-trace-isotonic-fit')
    await page.locator('input[type=radio][value=asphere]').check()
    await expect.poll(() => page.getByTestId('fit-residual').textContent()).toMatch(/vertex radius (9\.[89]|10\.[01])\d* µm/)
    await shot(page, 'uploads-02-trace-conic-fit')
    await page.locator('form').filter({ has: page.getByTestId('trace-fit') }).locator('input.lf-input').first().fill('Cap trace, conic fit')
    await page.getByRole('button', { name: 'Upload' }).click()
    await expect.poll(() => page.getByText(/Cap trace, conic fit/).count()).toBeGreaterThan(0)
    expect(await page.getByText(/fitted \(conic\/asphere, RMS residual \d+\.\d+ nm; raw trace kept\)/).count()).toBe(1)
    await shot(page, 'uploads-03-trace-stored')
  })

  it('that is not one cap is refused with its line, and cannot be uploaded', async () => {
    await pickTrace(traceCsv(0.2), 'two-bumps.csv')
    await expect.poll(() => page.getByTestId('fit-problems').textContent()).toMatch(/line \d+: the trace departs from the fitted cap by [\d.]+ nm, more than 2 % of the sag/)
    expect(await page.getByRole('button', { name: 'Upload' }).isDisabled()).toBe(true)
    await shot(page, 'uploads-04-trace-refused')
  })

  it('is traced as the fitted measured cap', async () => {
    const tables = (await api('GET', `/api/projects/${projectId}/tables`)).body.tables
    const t = (await api('GET', `/api/tables/${tables[0].id}`)).body.table
    expect(t.fit.method).toBe('asphere')
    const design = await api('POST', `/api/projects/${projectId}/designs`, {
      name: 'Fitted stylus caps',
      scenario: {
        emitter: { index: 1.7, angularProfile: 'lambertian', source: { shape: 'extended' } },
        reflector: { reflectance: 0.8, diffuseFraction: 0 },
        substrate: { index: 1.5, thicknessUm: 100, absorptionPerMm: 0 },
        lensArray: { lattice: 'hexagonal', pitchUm: 10, index: 1.5, ...t.use.lensArray },
        trace: { rays: 20_000, seed: 7, fresnel: 'averaged' },
      },
    })
    expect(design.status, JSON.stringify(design.body)).toBe(201)
    expect(design.body.design.scenario.lensArray.shape).toBe('measured')
    for (const seed of [7, 8]) {
      const run = await api('POST', '/api/runs', { designId: design.body.design.id, seed, precision: { rays: 20_000 } })
      expect(run.status, JSON.stringify(run.body)).toBe(201)
      runIds.push(run.body.run.id)
    }
    await page.goto(`${baseUrl}/runs/${runIds[0]}`)
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 120_000 })
    expect(await page.getByTestId('figure-extraction').textContent({ timeout: 30_000 })).toMatch(/\d+\.\d+ ± \d+\.\d+ %/)
    await shot(page, 'uploads-05-fitted-trace-run')
  })
})

describe('shortlist', () => {
  it('asks before moving the chosen mark, and the history names the entries', async () => {
    await page.goto(`${baseUrl}/runs/${runIds[1]}`)
    await page.locator('[data-testid=run-progress][data-status=done]').waitFor({ timeout: 120_000 })
    for (const [i, runId] of runIds.entries()) {
      const r = await api('POST', `/api/projects/${projectId}/shortlist`, { runId, cellIndex: 0, note: `seed ${i + 7}` })
      expect(r.status).toBe(201)
    }
    await page.goto(`${baseUrl}/projects/${projectId}`)
    const rows = page.locator('tbody tr').filter({ hasText: 'seed' })
    await rows.first().waitFor()
    const chooseRow = async (note: string, reason: string) => {
      await page.locator('tr', { hasText: note }).getByRole('button', { name: 'Choose…' }).click()
      await page.getByLabel('Why this candidate goes to fabrication').fill(reason)
      await page.getByRole('button', { name: 'Mark chosen' }).click()
    }
    await chooseRow('seed 7', 'Lowest sag the embossing line holds')
    await expect.poll(() => page.locator('tr', { hasText: 'seed 7' }).getByText('chosen', { exact: true }).count()).toBe(1)
    await chooseRow('seed 8', 'Second trace confirms the figure')
    const dialog = page.getByTestId('confirm-move')
    await dialog.waitFor()
    expect(await dialog.textContent()).toMatch(/seed 7 · cell 0 .* is the chosen candidate now\. Move the mark to .*seed 8 · cell 0/)
    await shot(page, 'shortlist-01-confirm-move')
    await dialog.getByRole('button', { name: 'Keep the current choice' }).click()
    expect(await page.locator('tr', { hasText: 'seed 7' }).getByText('chosen', { exact: true }).count()).toBe(1)
    await page.getByRole('button', { name: 'Mark chosen' }).click()
    await dialog.getByRole('button', { name: 'Move the mark' }).click()
    await expect.poll(() => page.locator('tr', { hasText: 'seed 8' }).getByText('chosen', { exact: true }).count()).toBe(1)
    await page.getByRole('button', { name: 'History' }).click()
    // Two runs of one design: the seed and the note tell the entries apart.
    await expect.poll(() => page.getByText(/chose .*· seed 8 · cell 0 · .*“seed 8” \(mark moved from .*· seed 7 · cell 0 · .*“seed 7”\): “Second trace confirms the figure”/).count()).toBe(1)
    expect(await page.getByText(/took the choice off .*\(replaced by /).count()).toBe(1)
    await shot(page, 'shortlist-02-history')
  })
})

describe('team page', () => {
  it('shows members and roles; the lead changes a role and cannot demote the last lead', async () => {
    await page.goto(`${baseUrl}/account`)
    await Promise.all([page.waitForURL(/\/teams\//), page.getByRole('link', { name: "Wren Aldous's team" }).click()])
    await page.getByTestId('members').waitFor()
    expect(await page.locator(`[data-member="${member.email}"]`).textContent()).toContain('Odile Brack')
    await shot(page, 'team-01-members')
    await page.getByLabel('Role of Odile Brack').selectOption('designer')
    await expect.poll(() => page.getByTestId('team-done').textContent()).toBe('Odile Brack is now designer.')
    const { rows: [m] } = await pool.query(`SELECT role FROM memberships m JOIN users u ON u.id = m.user_id WHERE m.team_id = $1 AND u.email = $2`, [teamId, member.email])
    expect(m.role).toBe('designer')
    await page.getByLabel('Role of Wren Aldous').selectOption('viewer')
    await expect.poll(() => page.getByTestId('team-problem').textContent()).toMatch(/Wren Aldous is the team's only lead; making them viewer would leave nobody/)
    await expect.poll(() => page.getByLabel('Role of Wren Aldous').inputValue()).toBe('lead')
    await shot(page, 'team-02-last-lead-refused')
  })

  it('invites and withdraws an invitation, and removes a member after asking', async () => {
    await page.getByLabel('E-mail').fill(`invitee.${stamp}@e2e.example`)
    await page.getByRole('button', { name: 'Send invitation' }).click()
    const inv = page.locator(`[data-invitation="invitee.${stamp}@e2e.example"]`)
    await inv.waitFor()
    await shot(page, 'team-03-pending-invitation')
    await inv.getByRole('button', { name: 'Withdraw' }).click()
    await expect.poll(() => inv.count()).toBe(0)
    await page.getByRole('button', { name: 'Remove Odile Brack' }).click()
    await shot(page, 'team-04-confirm-remove')
    await page.locator(`[data-member="${member.email}"]`).getByRole('button', { name: 'Remove', exact: true }).click()
    await expect.poll(() => page.locator(`[data-member="${member.email}"]`).count()).toBe(0)
    await expect.poll(() => page.getByTestId('team-done').textContent()).toBe('Odile Brack was removed from the team.')
    await shot(page, 'team-05-member-removed')
  })

  it('raised no uncaught page errors (a refused change is an answer, not an error)', () => {
    expect(pageErrors.filter((e) => !/status of 409/.test(e))).toEqual([])
  })
})
