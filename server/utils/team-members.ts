// Team membership changes by a lead: change a member's role, remove a member. A team always keeps at least one
// lead: demoting or removing the last one is refused with 409. The team's membership rows are locked for the
// check and the change, so two leads demoting each other at once cannot leave the team without a lead.
import { and, eq, sql } from 'drizzle-orm'
import { createError } from 'h3'
import { memberships, users, type Role } from '../db/schema'
import type { Db, DbOrTx } from './db'

async function lockedMember(tx: DbOrTx, teamId: string, userId: string) {
  await tx.execute(sql`SELECT user_id FROM memberships WHERE team_id = ${teamId} FOR UPDATE`)
  const [m] = await tx.select({ role: memberships.role, name: users.name }).from(memberships).innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)))
  if (!m) throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'This person is not a member of the team.' })
  const [{ leads }] = await tx.select({ leads: sql<number>`count(*)::int` }).from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.role, 'lead'))) as [{ leads: number }]
  return { ...m, leads }
}

const lastLead = (name: string, what: string) => createError({
  statusCode: 409, statusMessage: 'Conflict',
  message: `${name} is the team's only lead; ${what} would leave nobody to manage roles, invitations and the chosen candidate. Make another member lead first.`,
})

export function changeMemberRole(db: Db, teamId: string, userId: string, role: Role) {
  return db.transaction(async (tx) => {
    const m = await lockedMember(tx, teamId, userId)
    if (m.role === 'lead' && role !== 'lead' && m.leads <= 1) throw lastLead(m.name, `making them ${role}`)
    await tx.update(memberships).set({ role }).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)))
    return { userId, name: m.name, role, previousRole: m.role }
  })
}

export function removeMember(db: Db, teamId: string, userId: string) {
  return db.transaction(async (tx) => {
    const m = await lockedMember(tx, teamId, userId)
    if (m.role === 'lead' && m.leads <= 1) throw lastLead(m.name, 'removing them')
    await tx.delete(memberships).where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)))
    return { userId, name: m.name, role: m.role }
  })
}
