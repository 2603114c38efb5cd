// When PostgreSQL is down (restarting, unreachable), data routes answer 503 with a message a person can act on,
// instead of a bare 500, and the site itself keeps serving. The pool's query and connect are wrapped so every
// caller (Drizzle, the session adapter, raw queries) gets the same answer.
import { createError } from 'h3'
import type pg from 'pg'

const CONNECTION_CODES = new Set([
  'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND',
  // SQLSTATE class 08 (connection exception) and 57P0x (the server is shutting down or starting up).
  '08000', '08001', '08003', '08004', '08006', '57P01', '57P02', '57P03',
])

export function isDatabaseUnavailable(err: unknown): boolean {
  if (!err || typeof err !== 'object') return false
  const e = err as { code?: string; message?: string; errors?: unknown[] }
  if (e.code && CONNECTION_CODES.has(e.code)) return true
  // AggregateError from a dual-stack connect carries the socket errors inside.
  if (Array.isArray(e.errors) && e.errors.some(isDatabaseUnavailable)) return true
  const m = e.message ?? ''
  return /Connection terminated|timeout exceeded when trying to connect|the database system is (starting up|shutting down)|Client has encountered a connection error/i.test(m)
}

export function databaseUnavailableError(cause?: unknown) {
  return createError({
    statusCode: 503,
    statusMessage: 'Service Unavailable',
    message: 'The database is not answering right now; nothing was changed. Try again in a moment.',
    cause,
  })
}

/** Wraps pool.query and pool.connect so connection failures surface as 503 errors. */
export function answer503WhenDatabaseIsDown(pool: pg.Pool) {
  const marked = pool as pg.Pool & { __lensfield503?: boolean }
  if (marked.__lensfield503) return
  marked.__lensfield503 = true
  const query = pool.query.bind(pool) as (...args: unknown[]) => unknown
  const connect = pool.connect.bind(pool) as (...args: unknown[]) => unknown
  const map = (err: unknown) => { throw isDatabaseUnavailable(err) ? databaseUnavailableError(err) : err }
  ;(pool as unknown as { query: unknown }).query = (...args: unknown[]) => {
    // Callback style is left as it is; every caller here uses promises.
    if (typeof args[args.length - 1] === 'function') return query(...args)
    return (query(...args) as Promise<unknown>).catch(map)
  }
  ;(pool as unknown as { connect: unknown }).connect = (...args: unknown[]) => {
    if (typeof args[0] === 'function') return connect(...args)
    return (connect() as Promise<unknown>).catch(map)
  }
}
