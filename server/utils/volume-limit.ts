// Volume limits: at most `max` actions of a kind per key (a client address, a team) in a sliding hour, counted in
// the database so every web server process counts alike. The count and the new record happen under a
// transaction-scoped advisory lock on (kind, key), so twenty requests arriving in the same instant are counted one
// after the other. Past the limit: 429 with Retry-After and a sentence saying what to do.
import { and, count, eq, gt, lt, min, sql } from 'drizzle-orm'
import { createError, setResponseHeader, type H3Event } from 'h3'
import { actionEvents } from '../db/schema'
import type { Db } from './db'

export const VOLUME_WINDOW_MS = 60 * 60 * 1000

export async function takeVolume(db: Db, event: H3Event, kind: string, key: string, max: number, refusal: (minutes: number) => string): Promise<void> {
  const since = new Date(Date.now() - VOLUME_WINDOW_MS)
  const first = await db.transaction(async (tx) => {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${kind}), hashtext(${key}))`)
    await tx.delete(actionEvents).where(and(eq(actionEvents.kind, kind), eq(actionEvents.key, key), lt(actionEvents.at, since)))
    const [r] = await tx.select({ n: count(), first: min(actionEvents.at) }).from(actionEvents)
      .where(and(eq(actionEvents.kind, kind), eq(actionEvents.key, key), gt(actionEvents.at, since)))
    if (r!.n >= max) return r!.first
    await tx.insert(actionEvents).values({ kind, key })
    return null
  })
  if (first === null) return
  const seconds = Math.max(1, Math.ceil((new Date(first).getTime() + VOLUME_WINDOW_MS - Date.now()) / 1000))
  setResponseHeader(event, 'Retry-After', seconds)
  throw createError({ statusCode: 429, statusMessage: 'Too Many Requests', message: refusal(Math.ceil(seconds / 60)), data: { retryAfterSeconds: seconds } })
}

function limit(name: string, fallback: number): number {
  const n = Number(process.env[name])
  return Number.isInteger(n) && n > 0 ? n : fallback
}

export const volumeLimits = {
  signUpsPerAddress: () => limit('LENSFIELD_SIGN_UPS_PER_ADDRESS_HOUR', 5),
  invitationsPerTeam: () => limit('LENSFIELD_INVITATIONS_PER_TEAM_HOUR', 20),
  invitationsPerAddress: () => limit('LENSFIELD_INVITATIONS_PER_ADDRESS_HOUR', 30),
}
