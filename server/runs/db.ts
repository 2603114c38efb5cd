// What every part of a run's life shares: one transaction on a dedicated client (handed out too, for pg-boss's
// inserts through the same transaction), the stored form of tallies, the open statuses, and the progress NOTIFY.
import { sql } from 'drizzle-orm'
import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres'
import type pg from 'pg'
import * as schema from '../db/schema'
import { usePool } from '../utils/db'
import { CHANNEL_PROGRESS } from '../queue/config'

export type TxDb = NodePgDatabase<typeof schema>

/** Runs `fn` in one transaction on a dedicated client; the client is also handed out for pg-boss's inserts. */
export async function withTransaction<T>(fn: (tx: TxDb, client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await usePool().connect()
  try {
    await client.query('BEGIN')
    const result = await fn(drizzle(client, { schema }), client)
    await client.query('COMMIT')
    return result
  } catch (err) {
    await client.query('ROLLBACK').catch(() => {})
    throw err
  } finally {
    client.release()
  }
}

/** Statuses of a run or cell that can still change. */
export const OPEN_STATUSES = ['queued', 'running'] as const
export const isOpen = (status: string) => (OPEN_STATUSES as readonly string[]).includes(status)

/** Tells progress streams everywhere that the run changed (delivered at commit; the payload is the id only). */
export async function notifyProgress(tx: TxDb, runId: string): Promise<void> {
  await tx.execute(sql`SELECT pg_notify(${CHANNEL_PROGRESS}, ${runId})`)
}

/** A stored tally (bytea of little-endian Float64 counts) as a Float64Array; copied, since a Buffer from the driver
 *  may start at any byte offset and a Float64Array needs 8-byte alignment. */
export function tallyFromBytes(b: Buffer | null): Float64Array | null {
  if (!b) return null
  const copy = new Uint8Array(b.byteLength)
  copy.set(b)
  return new Float64Array(copy.buffer)
}

export function tallyToBytes(t: Float64Array | null): Buffer | null {
  return t ? Buffer.from(t.buffer, t.byteOffset, t.byteLength) : null
}
