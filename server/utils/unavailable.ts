// When PostgreSQL is down (restarting, unreachable), data routes answer 503 with a message a person can act on,
// instead of a bare 500, and the site itself keeps serving. server/utils/api-errors.ts applies it to every route.
import { createError } from 'h3'

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
