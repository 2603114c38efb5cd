// `npm run dev`: Postgres on loopback with migrations and demo data, then `nuxt dev` (hot reload) against it.
import pg from 'pg'
import type { ChildProcess } from 'node:child_process'
import { ensurePostgres, migrateDatabase, stopOnExit } from './postgres'
import { bin, startChild } from './run'
import { prepareWorker } from './trace-pool'
import { startFakeSmtp } from './fake-smtp'
import { dbFromPool } from '../server/utils/db'
import { loadDemoData } from '../server/utils/demo'
import { loadDemoResults } from '../server/utils/demo-results'

// Set once nuxt dev starts; the exit hook (registered first, with the database) stops it if it runs.
let nuxt: ChildProcess | undefined = undefined
const db = await ensurePostgres({ database: 'lensfield' })
stopOnExit(() => {
  if (nuxt && nuxt.exitCode === null) nuxt.kill('SIGTERM')
  db.stop()
})
await migrateDatabase(db.url)
const pool = new pg.Pool({ connectionString: db.url, max: 2 })
await loadDemoData(dbFromPool(pool))
await loadDemoResults(dbFromPool(pool))
await pool.end()

// Mail goes to the fake SMTP server on loopback (listed at /dev/mailbox) unless a real one is configured.
const mailbox = process.env.LENSFIELD_SMTP_HOST ? undefined : await startFakeSmtp(db.url)
// The dev server's embedded worker loads the bundle of workers/trace.ts (rebuilt when sources are newer).
const traceWorker = await prepareWorker()
nuxt = startChild(bin('nuxt'), ['dev', '--host', process.env.HOST ?? '127.0.0.1', ...process.argv.slice(2)], {
  ...process.env,
  LENSFIELD_TRACE_WORKER: traceWorker,
  DATABASE_URL: db.url,
  NUXT_PUBLIC_DEMO_MODE: 'true',
  ...mailbox?.env,
})
nuxt.on('exit', (code) => process.exit(code ?? 1))
