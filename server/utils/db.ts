// One pg pool and one Drizzle client per process, created on first use from DATABASE_URL.
// Plain module (no Nitro globals) so scripts/ and tests can import it too.
import pg from 'pg'
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres'
import * as schema from '../db/schema'

export type Db = NodePgDatabase<typeof schema>
/** The client handed to a transaction callback; accepts the same queries as Db. */
export type DbOrTx = Db | Parameters<Parameters<Db['transaction']>[0]>[0]

let pool: pg.Pool | undefined
let db: Db | undefined

export function usePool(): pg.Pool {
  if (!pool) {
    const connectionString = process.env.DATABASE_URL
    if (!connectionString) throw new Error('DATABASE_URL is not set: start Lensfield with `npm start` or `npm run dev`')
    // A short connect timeout so /api/health reports "down" quickly instead of hanging.
    pool = new pg.Pool({ connectionString, max: 10, connectionTimeoutMillis: 3000 })
    pool.on('error', (err) => console.error('[db] idle client error:', err.message))
    // A client in use (say, mid-transaction) when the server goes away emits 'error' on itself; unheard, that
    // would end the process. The query in flight fails on its own and its caller handles that.
    pool.on('connect', (client) => { client.on('error', (err) => console.error('[db] connection lost:', err.message)) })
  }
  return pool
}

export function useDb(): Db {
  db ??= drizzle(usePool(), { schema })
  return db
}

/** Wraps an existing pool (scripts, tests) in a Drizzle client with the schema. */
export function dbFromPool(p: pg.Pool): Db {
  return drizzle(p, { schema })
}

/** True when the database answers a trivial query. */
export async function databaseAnswers(): Promise<boolean> {
  try {
    await usePool().query('SELECT 1')
    return true
  } catch {
    return false
  }
}
