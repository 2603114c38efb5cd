// `npm test`: the static checks (type-check, then lint; LENSFIELD_SKIP_CHECKS=1 skips them for a targeted rerun),
// a throwaway Postgres (fresh cluster in a temp folder, or a fresh database on DATABASE_URL's server), migrations,
// the production build, then every vitest project (unit, physics, api, e2e). The api project's global setup
// (tests/api/global-setup.ts) starts the built server against that database. Extra arguments go to vitest,
// e.g. `npm test -- --project unit`.
import { randomBytes } from 'node:crypto'
import { spawnSync } from 'node:child_process'
import { createDatabase, ensurePostgres, migrateDatabase, repoRoot, stopOnExit } from './postgres'
import { bin, buildApp, staticChecks } from './run'

if (process.env.LENSFIELD_SKIP_CHECKS !== '1') {
  const failed = staticChecks()
  if (failed.length > 0) {
    console.error(`\n[checks] npm test stopped before the tests: ${failed.join(' and ')} failed; the errors are listed above.`)
    process.exit(1)
  }
}

const server = await ensurePostgres({ database: 'postgres', throwaway: true })
const dbName = `lensfield_test_${randomBytes(4).toString('hex')}`
stopOnExit(() => {
  if (!server.started) {
    // Someone else's server: drop only the database this run created.
    spawnSync(process.execPath, ['-e', `const pg=require('pg');const c=new pg.Client(${JSON.stringify(server.adminUrl)});c.connect().then(()=>c.query('DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)')).finally(()=>c.end())`], { cwd: repoRoot, stdio: 'inherit' })
  }
  server.stop()
})
const url = await createDatabase(server.adminUrl, dbName)
await migrateDatabase(url)
buildApp()

const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: url, LENSFIELD_PG_ADMIN_URL: server.adminUrl, NODE_ENV: 'test' }
// The fault tests stop and start this cluster (only when this run started it).
if (server.dataDir && server.binDir) Object.assign(env, { LENSFIELD_PG_DATA_DIR: server.dataDir, LENSFIELD_PG_BIN_DIR: server.binDir })
const r = spawnSync(bin('vitest'), ['run', '--config', 'tests/vitest.config.ts', ...process.argv.slice(2)], { cwd: repoRoot, stdio: 'inherit', env })
process.exitCode = r.status ?? 1
