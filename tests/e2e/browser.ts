// Debian's Chromium driven by playwright-core (no browser is downloaded). Headless, no GPU: WebGL is software
// (SwiftShader) or absent, and the pages must work either way.
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { repoRoot } from '../../scripts/postgres'

export const SHOTS = join(repoRoot, 'test-output', 'e2e')
export const CHROMIUM = process.env.LENSFIELD_CHROMIUM ?? '/usr/bin/chromium'

export async function launch(extraArgs: string[] = []): Promise<{ browser: BrowserContext; close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'lensfield-e2e-'))
  const ctx = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1280, height: 900 },
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
      '--disable-component-update', '--disable-sync', ...extraArgs],
  })
  return { browser: ctx, close: async () => { await ctx.close(); rmSync(profile, { recursive: true, force: true }) } }
}

export async function signIn(page: Page, baseUrl: string, email: string, password: string) {
  await page.goto(`${baseUrl}/sign-in`)
  // The button is enabled once the page is interactive; typing before that would be undone by hydration.
  await page.locator('button[type=submit]:not([disabled])').waitFor()
  await page.fill('#email', email)
  await page.fill('#password', password)
  await Promise.all([page.waitForURL(/\/projects/), page.click('button[type=submit]')])
}

export async function shot(page: Page, name: string) {
  await page.screenshot({ path: join(SHOTS, `${name}.png`), fullPage: true })
}

/** Console errors and uncaught exceptions of a page (Vue reports errors in hooks on the console). */
export function collectErrors(page: Page, into: string[]) {
  page.on('pageerror', (e) => into.push(String(e)))
  page.on('console', (m) => { if (m.type() === 'error') into.push(m.text()) })
}

export type { Browser, Page }
