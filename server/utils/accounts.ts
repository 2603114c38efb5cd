// Accounts: sign-up (user + own team as lead, in one transaction) and password sign-in.
import { eq } from 'drizzle-orm'
import { createError } from 'h3'
import { generateIdFromEntropySize } from 'lucia'
import { memberships, teams, users, type Role } from '../db/schema'
import type { SignInInput, SignUpInput } from '../../shared/types/account'
import { isUniqueViolation } from './api-errors'
import type { Db } from './db'
import { hashPassword, verifyPassword } from './password'

export function slugify(text: string): string {
  return text.normalize('NFKD').toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40) || 'team'
}

export async function signUpAccount(db: Db, input: SignUpInput) {
  const passwordHash = await hashPassword(input.password)
  const userId = generateIdFromEntropySize(10)
  const emailTaken = () => createError({
    statusCode: 409, statusMessage: 'Conflict', message: `An account with e-mail ${input.email} already exists: sign in instead.`,
  })
  try {
    return await db.transaction(async (tx) => {
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, input.email))
      if (existing) throw emailTaken()
      await tx.insert(users).values({ id: userId, email: input.email, name: input.name, passwordHash })
      const slug = `${slugify(input.name)}-${generateIdFromEntropySize(5)}`
      const [team] = await tx.insert(teams).values({ slug, name: `${input.name}'s team` }).returning()
      await tx.insert(memberships).values({ teamId: team!.id, userId, role: 'lead' })
      return { userId, teamId: team!.id }
    })
  } catch (err) {
    // Two sign-ups with one e-mail at the same moment: the unique index decides.
    if (isUniqueViolation(err, 'users_email_key')) throw emailTaken()
    throw err
  }
}

// Verified against when the e-mail is unknown, so both refusals take about the same time.
let dummyHash: Promise<string> | undefined

/** The user id for a correct e-mail/password pair, else null. */
export async function authenticate(db: Db, input: SignInInput): Promise<string | null> {
  const [user] = await db.select({ id: users.id, passwordHash: users.passwordHash }).from(users).where(eq(users.email, input.email))
  if (!user) {
    dummyHash ??= hashPassword('lensfield-no-such-user')
    await verifyPassword(await dummyHash, input.password)
    return null
  }
  return (await verifyPassword(user.passwordHash, input.password)) ? user.id : null
}

export async function listTeamsOfUser(db: Db, userId: string): Promise<{ id: string, name: string, slug: string, role: Role }[]> {
  return db.select({ id: teams.id, name: teams.name, slug: teams.slug, role: memberships.role })
    .from(memberships).innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, userId)).orderBy(teams.name)
}
