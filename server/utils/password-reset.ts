// Password reset by mail: a single-use link valid for an hour. The request route answers the same way whether or
// not the address has an account, and does the lookup and mailing after it has answered, so neither the reply nor
// its timing tells anyone which addresses are registered.
import { and, count, eq, gt, isNull } from 'drizzle-orm'
import { createError } from 'h3'
import { passwordResets, users } from '../db/schema'
import type { Db } from './db'
import { composeMail, publicBaseUrl, sendMail } from './mail'
import { hashPassword } from './password'
import { hashSecret, newSecret } from './secrets'

export const RESET_MINUTES = 60

/** Reset links one account may be sent per hour. */
export const RESETS_PER_HOUR = 3

export async function sendPasswordReset(db: Db, email: string, baseUrl?: string): Promise<void> {
  const [user] = await db.select({ id: users.id, name: users.name }).from(users).where(eq(users.email, email))
  if (!user) return
  // At most RESETS_PER_HOUR links an hour per account, so the form cannot be used to flood someone's inbox. The
  // user row is locked while counting and inserting: requests arriving together are counted one after another.
  // The reply is the same either way (it was sent before this runs), so it tells nothing.
  const token = newSecret()
  const allowed = await db.transaction(async (tx) => {
    await tx.select({ id: users.id }).from(users).where(eq(users.id, user.id)).for('update')
    const [recent] = await tx.select({ n: count() }).from(passwordResets)
      .where(and(eq(passwordResets.userId, user.id), gt(passwordResets.createdAt, new Date(Date.now() - 3_600_000))))
    if (recent!.n >= RESETS_PER_HOUR) return false
    await tx.insert(passwordResets).values({ tokenHash: hashSecret(token), userId: user.id, expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) })
    return true
  })
  if (!allowed) {
    console.warn(`[mail] password reset for ${email}: ${RESETS_PER_HOUR} links in the last hour already; none sent`)
    return
  }
  await sendMail(composeMail(email, 'Reset your Lensfield password', [
    `Someone (hopefully you, ${user.name}) asked to reset the password of your Lensfield account.`,
    `The link works once, for ${RESET_MINUTES} minutes. If you did not ask for it, ignore this mail: your password stays as it is.`,
  ], { label: 'Choose a new password', url: `${publicBaseUrl(baseUrl)}/reset-password/${token}` }))
}

/** Sets the new password and ends every session of the account; returns the user id. */
export async function resetPassword(db: Db, token: string, password: string): Promise<string> {
  const passwordHash = await hashPassword(password)
  return db.transaction(async (tx) => {
    const [row] = await tx.update(passwordResets).set({ usedAt: new Date() })
      .where(and(eq(passwordResets.tokenHash, hashSecret(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
      .returning({ userId: passwordResets.userId })
    if (!row) {
      throw createError({ statusCode: 410, statusMessage: 'Gone', message: 'This reset link is used, expired or unknown. Ask for a new one on the sign-in page.' })
    }
    await tx.update(users).set({ passwordHash }).where(eq(users.id, row.userId))
    // Other open links of the account stop working too.
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt)))
    return row.userId
  })
}
