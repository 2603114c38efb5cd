// `npm start`: Postgres on loopback → migrations → production build → node .output/server/index.mjs.
// `npm start` runs in demo mode, and says so: it loads the demo data (with finished results), lists the demo
// accounts on the sign-in page and opens the development mailbox to signed-in readers, and prints a warning, because
// anyone who can reach the port can then sign in with the published demo passwords. `npm start -- --production`
// (or LENSFIELD_DEMO=0) starts without any of it. The built server itself (.output/server/index.mjs) is in
// production mode unless this script (or the operator) sets the demo flag explicitly.
// Ctrl-C (or SIGTERM) stops the app and the database server it started.
import pg from 'pg'
import { join } from 'node:path'
import getPort from 'get-port'
import { ensurePostgres, migrateDatabase, repoRoot, stopOnExit } from './postgres'
import { buildApp, startChild, waitForHttp } from './run'
import { startFakeSmtp, type FakeSmtp } from './fake-smtp'
import { dbFromPool } from '../server/utils/db'
import { DEMO_USERS, loadDemoData } from '../server/utils/demo'
import { loadDemoResults } from '../server/utils/demo-results'
import type { ChildProcess } from 'node:child_process'

const demo = !process.argv.includes('--production') && process.env.LENSFIELD_DEMO !== '0'
// Set once the app server starts; the exit hook (registered first, with the database) stops it if it runs.
let app: ChildProcess | undefined = undefined
let mailbox: FakeSmtp | undefined
const db = await ensurePostgres({ database: 'lensfield' })
stopOnExit(async () => {
  if (app && app.exitCode === null) app.kill('SIGTERM')
  db.stop()
  await mailbox?.close()
})

await migrateDatabase(db.url)
if (demo) {
  const pool = new pg.Pool({ connectionString: db.url, max: 2 })
  await loadDemoData(dbFromPool(pool))
  await loadDemoResults(dbFromPool(pool))
  await pool.end()
  console.log('[demo] demo data loaded')
}

// Mail goes to the fake SMTP server on loopback (listed at /dev/mailbox) unless a real one is configured.
if (!process.env.LENSFIELD_SMTP_HOST) mailbox = await startFakeSmtp(db.url)

buildApp()

const host = process.env.HOST ?? '127.0.0.1'
// PORT when given; else 3000 when free (a stable address for bookmarks); else any free port.
const port = Number(process.env.PORT) || await getPort({ port: 3000, host })
app = startChild(process.execPath, [join(repoRoot, '.output', 'server', 'index.mjs')], {
  ...process.env,
  DATABASE_URL: db.url,
  HOST: host,
  PORT: String(port),
  NODE_ENV: 'production',
  NUXT_PUBLIC_DEMO_MODE: demo ? 'true' : 'false',
  ...mailbox?.env,
  LENSFIELD_PUBLIC_URL: process.env.LENSFIELD_PUBLIC_URL ?? `http://${host.includes(':') ? `[${host}]` : host}:${port}`,
})
app.on('exit', (code, signal) => {
  console.log(`[start] app server ended (${signal ?? `exit ${code}`})`)
  process.exit(code ?? 1)
})

const url = `http://${host.includes(':') ? `[${host}]` : host}:${port}`
await waitForHttp(`${url}/api/health`)
if (demo) {
  console.log(`
Lensfield is running at ${url} in DEMO MODE

WARNING: demo mode is for trying Lensfield on your own machine. The demo accounts below have published passwords
and the sign-in page lists them; do not expose this port to other people. For real use: npm start -- --production.

Demo accounts (team "Tallowby Luminous Panels"):
${DEMO_USERS.map((u) => `  ${u.role.padEnd(9)} ${u.email.padEnd(34)} password: ${u.password}`).join('\n')}

${mailbox ? `Mail is captured (nothing is delivered); signed in, read your own at ${url}/dev/mailbox\n\n` : ''}Press Ctrl-C to stop the app and its database server.
`)
} else {
  console.log(`
Lensfield is running at ${url}

${mailbox ? 'No mail server is configured (LENSFIELD_SMTP_HOST): mail is captured locally and not delivered.\n\n' : ''}Press Ctrl-C to stop the app and its database server. (Plain \`npm start\` starts it with the demo data.)
`)
}
