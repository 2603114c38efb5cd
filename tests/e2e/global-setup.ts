// Global setup of the `e2e` project: creates its own database on the throwaway server that `npm test` started (the
// api project's tests share DATABASE_URL and start their own workers; an embedded worker there would take their
// jobs), migrates it, loads the demo data, and starts the built server WITH its embedded worker on a free port.
import { spawn } from 'node:child_process'
import { createWriteStream, existsSync, mkdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import pg from 'pg'
import type { TestProject } from 'vitest/node'
import { randomBytes } from 'node:crypto'
import { createDatabase, freePort, migrateDatabase, repoRoot } from '../../scripts/postgres'
import { waitForHttp } from '../../scripts/run'
import { dbFromPool } from '../../server/utils/db'
import { loadDemoData } from '../../server/utils/demo'
import { startFakeSmtp } from '../../scripts/fake-smtp'
import { loadDemoResults } from '../../server/utils/demo-results'

declare module 'vitest' {
  export interface ProvidedContext {
    e2eBaseUrl: string
    e2eProjectId: string
    /** The e2e database, for tests that read the fake SMTP's mailbox_messages (invitation links). */
    e2eDatabaseUrl: string
  }
}

export default async function setup(project: TestProject) {
  const adminUrl = process.env.LENSFIELD_PG_ADMIN_URL
  if (!adminUrl) throw new Error('The e2e tests need a database server: run them with `npm test -- --project e2e` (it starts PostgreSQL and builds the app).')
  const dbName = `lensfield_e2e_${randomBytes(4).toString('hex')}`
  const databaseUrl = await createDatabase(adminUrl, dbName)
  await migrateDatabase(databaseUrl)
  const entry = join(repoRoot, '.output', 'server', 'index.mjs')
  if (!existsSync(entry)) throw new Error('No production build in .output/: run `npm test` (it runs `nuxt build` first).')

  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 })
  const { projectId } = await loadDemoData(dbFromPool(pool))
  await loadDemoResults(dbFromPool(pool))
  await pool.end()

  // Invitations send mail: the fake SMTP server stores it in the e2e database's mailbox_messages.
  const mailbox = await startFakeSmtp(databaseUrl)
  const port = await freePort()
  const outDir = join(repoRoot, 'test-output', 'e2e')
  mkdirSync(outDir, { recursive: true })
  const logFile = join(outDir, 'server.log')
  const log = createWriteStream(logFile)
  const server = spawn(process.execPath, [entry], {
    cwd: repoRoot,
    env: {
      ...process.env, ...mailbox.env, DATABASE_URL: databaseUrl, HOST: '127.0.0.1', PORT: String(port), NODE_ENV: 'production',
      LENSFIELD_PUBLIC_URL: `http://127.0.0.1:${port}`,
      // the embedded worker stays on (LENSFIELD_EMBEDDED_WORKER unset); small batches so progress moves visibly
      LENSFIELD_BATCH_RAYS: '10000',
      LENSFIELD_QUEUE_MAINTENANCE_SECONDS: '1',
      // Every browser signs up from 127.0.0.1; the volume limits are tested in tests/api/volume-limits.test.ts.
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
    throw new Error(`${(err as Error).message}\nserver log:\n${readFileSync(logFile, 'utf8')}`, { cause: err })
  }
  project.provide('e2eBaseUrl', baseUrl)
  project.provide('e2eProjectId', projectId)
  project.provide('e2eDatabaseUrl', databaseUrl)

  return async () => {
    if (server.exitCode === null) {
      const exited = new Promise((r) => server.once('exit', r))
      server.kill('SIGTERM')
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5000))])
      if (server.exitCode === null) server.kill('SIGKILL')
    }
    await mailbox.close()
    // on a shared server (DATABASE_URL given to npm test) leave nothing behind
    const admin = new pg.Client({ connectionString: adminUrl })
    await admin.connect()
    try { await admin.query(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`) } finally { await admin.end() }
  }
}
