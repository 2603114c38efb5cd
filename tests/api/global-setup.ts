// Global setup of the `api` project: starts the built server (node .output/server/index.mjs) on a free port
// against DATABASE_URL (a throwaway, migrated database prepared by `npm test`), and stops it afterwards.
import { spawn } from 'node:child_process'
import { createWriteStream, existsSync, mkdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { TestProject } from 'vitest/node'
import { freePort, repoRoot } from '../../scripts/postgres'
import { waitForHttp } from '../../scripts/run'
import { startFakeSmtp } from '../../scripts/fake-smtp'

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    adminUrl: string
  }
}

export default async function setup(project: TestProject) {
  const databaseUrl = process.env.DATABASE_URL
  const adminUrl = process.env.LENSFIELD_PG_ADMIN_URL
  if (!databaseUrl || !adminUrl) {
    throw new Error('The api tests need a database: run them with `npm test` (it starts PostgreSQL and builds the app).')
  }
  const entry = join(repoRoot, '.output', 'server', 'index.mjs')
  if (!existsSync(entry)) throw new Error('No production build in .output/: run `npm test` (it runs `nuxt build` first).')

  // The fake SMTP server stores every mail in mailbox_messages; worker processes the tests start inherit its
  // address through process.env, so they can send the sweep-finished mail as well.
  const mailbox = await startFakeSmtp(databaseUrl)
  const port = await freePort()
  Object.assign(process.env, mailbox.env, { LENSFIELD_PUBLIC_URL: `http://127.0.0.1:${port}` })
  const logDir = join(repoRoot, 'test-output')
  mkdirSync(logDir, { recursive: true })
  const logFile = join(logDir, 'api-server.log')
  const log = createWriteStream(logFile)
  const server = spawn(process.execPath, [entry], {
    cwd: repoRoot,
    env: {
      ...process.env, DATABASE_URL: databaseUrl, HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production',
      // Demo mode on, so /dev/mailbox and its route answer.
      NUXT_PUBLIC_DEMO_MODE: 'true',
      // Job system for tests: no embedded worker (each test starts the real worker processes it needs), small
      // batches, a short expiry and frequent queue maintenance so a killed worker's batch comes back in seconds.
      LENSFIELD_EMBEDDED_WORKER: '0',
      // Lets the sign-in throttle tests act from distinct client addresses (X-Forwarded-For).
      LENSFIELD_TRUST_PROXY: '1',
      LENSFIELD_BATCH_RAYS: '50000',
      LENSFIELD_JOB_EXPIRE_SECONDS: '8',
      LENSFIELD_JOB_RETRY_DELAY_SECONDS: '1',
      LENSFIELD_QUEUE_MAINTENANCE_SECONDS: '1',
      // Every test signs up from 127.0.0.1; tests/api/volume-limits.test.ts starts a server of its own with the
      // default limits.
      LENSFIELD_SIGN_UPS_PER_ADDRESS_HOUR: '100000',
      LENSFIELD_INVITATIONS_PER_ADDRESS_HOUR: '100000',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  })
  server.stdout.pipe(log)
  server.stderr.pipe(log)
  const baseUrl = `http://127.0.0.1:${port}`
  try {
    await waitForHttp(`${baseUrl}/api/health`, 30_000)
  } catch (err) {
    server.kill('SIGKILL')
    await mailbox.close()
    throw new Error(`${(err as Error).message}\nserver log:\n${readFileSync(logFile, 'utf8')}`, { cause: err })
  }
  project.provide('baseUrl', baseUrl)
  project.provide('databaseUrl', databaseUrl)
  project.provide('adminUrl', adminUrl)

  return async () => {
    if (server.exitCode !== null) return mailbox.close()
    const exited = new Promise((r) => server.once('exit', r))
    server.kill('SIGTERM')
    await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))])
    if (server.exitCode === null) server.kill('SIGKILL')
    await mailbox.close()
  }
}
