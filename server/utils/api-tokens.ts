// Personal API tokens for scripts: `Authorization: Bearer lf_…`. A token acts as its user, so it reaches exactly the
// teams the user is a member of, with the user's role there, and nothing else (the same role checks as a session).
// Stored as SHA-256 of the secret; shown once at creation. Revoked tokens stop working at once.
//
// Why a bearer request skips the Origin check (server/middleware/01.origin.ts): that check stops cross-site
// request forgery, which rides on the cookie a browser attaches by itself. A browser never attaches an
// Authorization header by itself, and a page of another site cannot set one on a request to Lensfield without a
// CORS preflight that Lensfield does not grant. A bearer request is therefore always one its sender wrote on
// purpose; and when the header is present the session cookie is ignored, so a bad token cannot fall back to it.
import { and, desc, eq, isNull } from 'drizzle-orm'
import { createError, getRequestHeader, type H3Event } from 'h3'
import type { User } from 'lucia'
import { apiTokens, users } from '../db/schema'
import type { Db } from './db'
import { hashSecret, newSecret } from './secrets'

declare module 'h3' {
  interface H3EventContext {
    /** How the request was authenticated: the session cookie, or an API token. */
    authMethod?: 'session' | 'token'
    apiTokenId?: string
  }
}

export const TOKEN_PREFIX = 'lf_'

/** The bearer token of the request, or null when there is no Authorization: Bearer header. */
export function bearerToken(event: H3Event): string | null {
  const h = getRequestHeader(event, 'authorization')
  if (!h) return null
  const m = /^Bearer\s+(.+)$/i.exec(h.trim())
  return m ? m[1]!.trim() : null
}

export async function createApiToken(db: Db, userId: string, name: string) {
  const token = TOKEN_PREFIX + newSecret()
  const [row] = await db.insert(apiTokens).values({ userId, name, tokenHash: hashSecret(token), prefix: token.slice(0, 9) }).returning()
  return { token, id: row!.id, name: row!.name, prefix: row!.prefix, createdAt: row!.createdAt }
}

export function listApiTokens(db: Db, userId: string) {
  return db.select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt,
    revokedAt: apiTokens.revokedAt })
    .from(apiTokens).where(eq(apiTokens.userId, userId)).orderBy(desc(apiTokens.createdAt))
}

export async function revokeApiToken(db: Db, userId: string, id: string) {
  const [row] = await db.update(apiTokens).set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, id), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt))).returning({ id: apiTokens.id })
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'No active token with this id among your tokens.' })
}

/** The user a token acts as, or null when it is unknown or revoked. */
export async function userForApiToken(db: Db, token: string): Promise<{ user: User; tokenId: string } | null> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length > 200) return null
  const [row] = await db.select({ id: users.id, email: users.email, name: users.name, tokenId: apiTokens.id }).from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.tokenHash, hashSecret(token)), isNull(apiTokens.revokedAt)))
  if (!row) return null
  await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.tokenId))
  return { user: { id: row.id, email: row.email, name: row.name }, tokenId: row.tokenId }
}

/** Token management belongs to the account page: a token cannot mint or revoke tokens. */
export function requireSessionAuth(event: H3Event) {
  if (event.context.authMethod !== 'session') {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: 'API tokens are managed on the account page, signed in with your password; a token cannot create or revoke tokens.' })
  }
}
