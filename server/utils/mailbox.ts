// The development mailbox: mail captured by the fake SMTP server (scripts/fake-smtp.ts), listed at /dev/mailbox.
// Present in demo and development mode only; elsewhere the route answers 404 like any missing page.
import { desc } from 'drizzle-orm'
import { createError, type H3Event } from 'h3'
import { mailboxMessages } from '../db/schema'
import { useDb } from './db'
import { parseMail } from './mime'

export function requireMailboxMode(event: H3Event) {
  // Set from the environment (NUXT_PUBLIC_DEMO_MODE), so it may arrive as the string "true".
  const demo: unknown = useRuntimeConfig(event).public.demoMode
  if (!(demo === true || demo === 'true') && process.env.NODE_ENV !== 'development') {
    throw createError({ statusCode: 404, statusMessage: 'Not Found', message: 'The development mailbox exists in demo and development mode only.' })
  }
}

export async function listMailbox(limit = 100) {
  const rows = await useDb().select().from(mailboxMessages).orderBy(desc(mailboxMessages.receivedAt)).limit(limit)
  return rows.map((r) => {
    const m = parseMail(r.raw)
    return { id: r.id, receivedAt: r.receivedAt, from: r.mailFrom, to: r.rcptTo, subject: r.subject || m.subject, text: m.text, html: m.html }
  })
}
