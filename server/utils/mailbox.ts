// The development mailbox: mail captured by the fake SMTP server (scripts/fake-smtp.ts), listed at /dev/mailbox.
// Present in demo and development mode only; elsewhere the route answers 404 like any missing page. Even there it
// needs a signed-in user and shows only mail addressed to them, and to a lead also mail to their teams' members
// and to addresses their teams invited: reset links for other people's accounts are not readable.
import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import { createError, type H3Event } from 'h3'
import { invitations, mailboxMessages, memberships, users } from '../db/schema'
import { useDb } from './db'
import { parseMail } from './mime'

export function requireMailboxMode(event: H3Event) {
  // Set from the environment (NUXT_PUBLIC_DEMO_MODE), so it may arrive as the string "true".
  const demo: unknown = useRuntimeConfig(event).public.demoMode
  if (!(demo === true || demo === 'true') && process.env.NODE_ENV !== 'development') {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'The development mailbox exists in demo and development mode only.' })
  }
}

/** The addresses whose mail `user` may read: their own, and for a lead their teams' members and invitees. */
export async function mailboxAddressesOf(user: { id: string, email: string }): Promise<string[]> {
  const db = useDb()
  const led = db.select({ teamId: memberships.teamId }).from(memberships)
    .where(and(eq(memberships.userId, user.id), eq(memberships.role, 'lead')))
  const [members, invited] = await Promise.all([
    db.select({ email: users.email }).from(memberships).innerJoin(users, eq(users.id, memberships.userId))
      .where(inArray(memberships.teamId, led)),
    db.select({ email: invitations.email }).from(invitations).where(inArray(invitations.teamId, led)),
  ])
  return [...new Set([user.email, ...members.map((m) => m.email), ...invited.map((i) => i.email)].map((e) => e.toLowerCase()))]
}

export async function listMailbox(addresses: string[], limit = 100) {
  if (!addresses.length) return []
  // rcpt_to is a JSON array of addresses; ?| is "contains any of these strings". Compared in lower case.
  const lowered = sql`(SELECT coalesce(jsonb_agg(lower(a)), '[]'::jsonb) FROM jsonb_array_elements_text(${mailboxMessages.rcptTo}) a)`
  const rows = await useDb().select().from(mailboxMessages)
    .where(sql`${lowered} ?| ARRAY[${sql.join(addresses.map((a) => sql`${a}`), sql`, `)}]::text[]`)
    .orderBy(desc(mailboxMessages.receivedAt)).limit(limit)
  return Promise.all(rows.map(async (r) => {
    const m = await parseMail(r.raw)
    return { id: r.id, receivedAt: r.receivedAt, from: r.mailFrom, to: r.rcptTo, subject: r.subject || m.subject, text: m.text, html: m.html }
  }))
}
