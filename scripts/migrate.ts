// `npm run db:migrate`: applies drizzle/ migrations to DATABASE_URL, or to the project's own loopback cluster
// (started for the purpose and stopped again).
import { ensurePostgres, migrateDatabase, stopOnExit } from './postgres'

const db = await ensurePostgres({ database: 'lensfield' })
stopOnExit(db.stop)
await migrateDatabase(db.url)
console.log('[migrate] migrations applied')
