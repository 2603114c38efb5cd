// Sign-in throttling: at most 5 failed attempts per account (the e-mail as typed, lower-cased, whether or not such
// an account exists, so the answer tells nothing about who has one) and 20 per client address in 15 minutes; past
// that, 429 with the time to wait. Failures are kept in Postgres, so every web server process counts the same.
// A success clears the account's failures. (OWASP Authentication Cheat Sheet, "Login Throttling": common practice.)
import { and, count, eq, gt, lt, min } from 'drizzle-orm'
import { createError, getRequestIP, setResponseHeader, type H3Event } from 'h3'
import { signInFailures } from '../db/schema'
import type { Db } from './db'

export const WINDOW_MS = 15 * 60 * 1000
export const MAX_PER_ACCOUNT = 5
export const MAX_PER_ADDRESS = 20

export function accountKey(email: string): string {
  return email.trim().toLowerCase()
}

export function clientAddress(event: H3Event): string {
  // Behind a proxy set LENSFIELD_TRUST_PROXY=1 so the forwarded address counts, not the proxy's.
  return getRequestIP(event, { xForwardedFor: process.env.LENSFIELD_TRUST_PROXY === '1' }) ?? 'unknown'
}

/** Refuses with 429 (and Retry-After) when the account or the address has used up its attempts. */
export async function assertSignInAllowed(db: Db, event: H3Event, email: string): Promise<void> {
  const since = new Date(Date.now() - WINDOW_MS)
  const account = accountKey(email)
  const address = clientAddress(event)
  // Old rows are of no further use.
  await db.delete(signInFailures).where(lt(signInFailures.at, since))
  const [byAccount] = await db.select({ n: count(), first: min(signInFailures.at) }).from(signInFailures)
    .where(and(eq(signInFailures.accountKey, account), gt(signInFailures.at, since)))
  const [byAddress] = await db.select({ n: count(), first: min(signInFailures.at) }).from(signInFailures)
    .where(and(eq(signInFailures.address, address), gt(signInFailures.at, since)))
  const blocked = [
    byAccount!.n >= MAX_PER_ACCOUNT ? byAccount!.first : null,
    byAddress!.n >= MAX_PER_ADDRESS ? byAddress!.first : null,
  ].filter((d): d is Date => d !== null)
  if (blocked.length === 0) return
  const until = Math.max(...blocked.map((d) => new Date(d).getTime() + WINDOW_MS))
  const seconds = Math.max(1, Math.ceil((until - Date.now()) / 1000))
  setResponseHeader(event, 'Retry-After', seconds)
  throw createError({
    statusCode: 429,
    statusMessage: 'Too Many Requests',
    message: `Too many failed sign-ins. Try again in ${Math.ceil(seconds / 60)} minute(s), or reset your password.`,
    data: { retryAfterSeconds: seconds },
  })
}

export async function recordSignInFailure(db: Db, event: H3Event, email: string): Promise<void> {
  await db.insert(signInFailures).values({ accountKey: accountKey(email), address: clientAddress(event) })
}

export async function clearSignInFailures(db: Db, email: string): Promise<void> {
  await db.delete(signInFailures).where(eq(signInFailures.accountKey, accountKey(email)))
}
