// Database-level checks on fresh databases of their own (created on the test server, dropped afterwards).
import pg from 'pg'
import { randomBytes } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, describe, expect, inject, it } from 'vitest'
import { createDatabase, migrateDatabase, migrationsFolder } from '../../scripts/postgres'
import { dbFromPool } from '../../server/utils/db'
import { DEMO_DESIGNS, DEMO_USERS, loadDemoData } from '../../server/utils/demo'

const adminUrl = inject('adminUrl')
const created: string[] = []

async function freshDatabase(tag: string) {
  const name = `lensfield_${tag}_${randomBytes(4).toString('hex')}`
  created.push(name)
  return createDatabase(adminUrl, name)
}

afterAll(async () => {
  const admin = new pg.Client({ connectionString: adminUrl })
  await admin.connect()
  for (const name of created) await admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`)
  await admin.end()
})

// Every table of server/db/schema.ts, sorted.
const TABLES = [
  'action_events', 'api_tokens', 'data_tables', 'designs', 'invitations', 'mailbox_messages', 'memberships', 'password_resets',
  'projects', 'run_batches', 'run_cells', 'runs', 'sessions', 'shortlist_comments', 'shortlist_entries',
  'shortlist_events', 'sign_in_failures', 'teams', 'users',
]

describe('migrations', () => {
  it('apply to an empty database, create every table, and are a no-op the second time', async () => {
    const url = await freshDatabase('migrate')
    const pool = new pg.Pool({ connectionString: url, max: 1 })
    try {
      const before = await pool.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'`)
      expect(before.rowCount).toBe(0)
      await migrateDatabase(url)
      const after = await pool.query(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' ORDER BY 1`)
      expect(after.rows.map((r) => r.table_name)).toEqual(TABLES)
      const journal = JSON.parse(readFileSync(join(migrationsFolder, 'meta', '_journal.json'), 'utf8'))
      const applied = await pool.query('SELECT count(*)::int AS n FROM drizzle.__drizzle_migrations')
      expect(applied.rows[0].n).toBe(journal.entries.length)
      await migrateDatabase(url)
      expect((await pool.query('SELECT count(*)::int AS n FROM drizzle.__drizzle_migrations')).rows[0].n).toBe(journal.entries.length)
    } finally {
      await pool.end()
    }
  })
})

describe('demo data', () => {
  it('loads twice without duplicates or changes', async () => {
    const url = await freshDatabase('demo')
    await migrateDatabase(url)
    const pool = new pg.Pool({ connectionString: url, max: 2 })
    const snapshot = async () => {
      const out: Record<string, unknown[]> = {}
      for (const t of TABLES) out[t] = (await pool.query(`SELECT * FROM ${t} ORDER BY 1, 2`)).rows
      return out
    }
    try {
      const first = await loadDemoData(dbFromPool(pool))
      const once = await snapshot()
      expect(once.users).toHaveLength(DEMO_USERS.length)
      expect(once.teams).toHaveLength(1)
      expect(once.memberships).toHaveLength(DEMO_USERS.length)
      expect(once.projects).toHaveLength(1)
      expect(once.designs).toHaveLength(DEMO_DESIGNS.length)
      expect(new Set((once.memberships as { role: string }[]).map((m) => m.role))).toEqual(new Set(['lead', 'designer', 'viewer']))

      const second = await loadDemoData(dbFromPool(pool))
      expect(second).toEqual(first)
      expect(await snapshot()).toEqual(once)
    } finally {
      await pool.end()
    }
  })
})
