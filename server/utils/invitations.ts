// Invitations: a lead invites an e-mail address into a team with a role. The link carries a 32-byte random secret
// (stored only as its SHA-256), works once, and expires after 7 days. Accepting joins the signed-in account with
// that e-mail, or creates the account; an existing member gets the invited role.
import { and, desc, eq, gt, isNull, sql } from 'drizzle-orm'
import { createError } from 'h3'
import { generateIdFromEntropySize } from 'lucia'
import { invitations, memberships, teams, users, type Role } from '../db/schema'
import type { Db, DbOrTx } from './db'
import { composeMail, publicBaseUrl, sendMail } from './mail'
import { hashPassword } from './password'
import { hashSecret, newSecret } from './secrets'

export const INVITATION_DAYS = 7

/** 409 when the team already has an open (unused, not withdrawn, unexpired) invitation for this address. */
export async function assertNoPendingInvitation(db: DbOrTx, teamId: string, email: string) {
  const [open] = await db.select({ id: invitations.id }).from(invitations)
    .where(and(eq(invitations.teamId, teamId), sql`lower(${invitations.email}) = lower(${email})`,
      isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
    .limit(1)
  if (open) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `${email} already has an open invitation to this team. Withdraw it first to send a new one.` })
  }
}

export async function createInvitation(db: Db, opts: { teamId: string; email: string; role: Role; invitedBy: { id: string; name: string }; baseUrl?: string }) {
  const token = newSecret()
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 86_400_000)
  const [team] = await db.select().from(teams).where(eq(teams.id, opts.teamId))
  // Check and insert under a lock on (team, address), so two invitations sent at the same instant cannot both pass.
  const inv = await db.transaction(async (tx) => {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${`invitation:${opts.teamId}:${opts.email.toLowerCase()}`}))`)
    await assertNoPendingInvitation(tx, opts.teamId, opts.email)
    const [row] = await tx.insert(invitations).values({
      teamId: opts.teamId, email: opts.email, role: opts.role, tokenHash: hashSecret(token), invitedBy: opts.invitedBy.id, expiresAt,
    }).returning()
    return row
  })
  const url = `${publicBaseUrl(opts.baseUrl)}/invitations/${token}`
  try {
    // The subject is fixed text: names the inviter chose stay in the body, where they read as quoted names.
    await sendMail(composeMail(opts.email, 'A team on Lensfield invites you', [
      `${opts.invitedBy.name} invites you to join the team "${team!.name}" on Lensfield as ${opts.role}.`,
      `The link works once and expires on ${expiresAt.toISOString().slice(0, 10)} (${INVITATION_DAYS} days). If you did not expect this mail, ignore it.`,
    ], { label: 'Accept the invitation', url }))
  } catch (err) {
    // Without the mail the invitation is of no use: withdraw it and tell the lead.
    await db.delete(invitations).where(eq(invitations.id, inv!.id))
    throw createError({ statusCode: 502, statusMessage: 'Bad Gateway', message: `The invitation mail could not be sent (${(err as Error).message}); nothing was saved. Try again later.` })
  }
  return { id: inv!.id, email: inv!.email, role: inv!.role, expiresAt: inv!.expiresAt }
}

export function listInvitations(db: Db, teamId: string) {
  return db.select({
    id: invitations.id, email: invitations.email, role: invitations.role, createdAt: invitations.createdAt,
    expiresAt: invitations.expiresAt, acceptedAt: invitations.acceptedAt, revokedAt: invitations.revokedAt, invitedBy: users.name,
  }).from(invitations).leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.teamId, teamId)).orderBy(desc(invitations.createdAt)).limit(200)
}

function invalidLink(message: string) {
  return createError({ statusCode: 410, statusMessage: 'Gone', message })
}

/** The invitation a link names, or a 404/410 saying why it cannot be used. */
async function openInvitation(db: Db, token: string) {
  const [row] = await db.select({ inv: invitations, teamName: teams.name, inviter: users.name }).from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId)).leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashSecret(token)))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'This invitation link is not known. Check that the whole link was copied, or ask the lead for a new invitation.' })
  if (row.inv.acceptedAt) throw invalidLink('This invitation was already used. Sign in, or ask the lead for a new invitation.')
  if (row.inv.revokedAt) throw invalidLink('This invitation was withdrawn by a lead of the team. Ask the lead for a new one.')
  if (row.inv.expiresAt.getTime() <= Date.now()) throw invalidLink(`This invitation expired on ${row.inv.expiresAt.toISOString().slice(0, 10)}. Ask the lead for a new one.`)
  return row
}

export async function describeInvitation(db: Db, token: string) {
  const { inv, teamName, inviter } = await openInvitation(db, token)
  const [account] = await db.select({ id: users.id }).from(users).where(eq(users.email, inv.email))
  return { email: inv.email, role: inv.role, team: teamName, invitedBy: inviter, expiresAt: inv.expiresAt, accountExists: !!account }
}

/**
 * Uses the invitation once. `signedIn` is the current user (must have the invited e-mail); without one, an account
 * is created from name/password when none exists for the e-mail. Returns the user id to start a session for.
 */
export async function acceptInvitation(db: Db, input: { token: string; name?: string; password?: string }, signedIn: { id: string; email: string } | null) {
  const { inv } = await openInvitation(db, input.token)
  if (signedIn && signedIn.email !== inv.email) {
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message: `This invitation is for ${inv.email}, but you are signed in as ${signedIn.email}. Sign out and open the link again.` })
  }
  const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, inv.email))
  if (!signedIn && existing) {
    throw createError({ statusCode: 409, statusMessage: 'Conflict', message: `An account for ${inv.email} exists: sign in first, then open the invitation link again.` })
  }
  if (!signedIn && (!input.name || !input.password)) {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'name and password are required to create your account (password at least 10 characters).' })
  }
  const passwordHash = signedIn ? '' : await hashPassword(input.password!)
  return db.transaction(async (tx) => {
    // Single use: only the request that flips accepted_at goes on, even when two arrive at once.
    const [taken] = await tx.update(invitations).set({ acceptedAt: new Date() })
      .where(and(eq(invitations.id, inv.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())))
      .returning({ id: invitations.id })
    if (!taken) throw invalidLink('This invitation was already used. Sign in, or ask the lead for a new invitation.')
    let userId = signedIn?.id
    if (!userId) {
      userId = generateIdFromEntropySize(10)
      await tx.insert(users).values({ id: userId, email: inv.email, name: input.name!, passwordHash })
    }
    await tx.insert(memberships).values({ teamId: inv.teamId, userId, role: inv.role })
      .onConflictDoUpdate({ target: [memberships.teamId, memberships.userId], set: { role: inv.role } })
    await tx.update(invitations).set({ acceptedBy: userId }).where(eq(invitations.id, inv.id))
    return { userId, teamId: inv.teamId, role: inv.role, created: !signedIn }
  })
}

export async function revokeInvitation(db: Db, teamId: string, id: string, by: string) {
  const [row] = await db.update(invitations).set({ revokedAt: new Date(), revokedBy: by })
    .where(and(eq(invitations.id, id), eq(invitations.teamId, teamId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .returning({ id: invitations.id })
  if (!row) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: 'This invitation is already used or withdrawn.' })
}

export async function findInvitationTeam(db: Db, id: string) {
  const [row] = await db.select({ teamId: invitations.teamId }).from(invitations).where(eq(invitations.id, id))
  return row?.teamId ?? null
}
