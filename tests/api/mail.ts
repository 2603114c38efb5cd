// Mail as the fake SMTP server captured it (mailbox_messages), for the api tests.
import type pg from 'pg'
import { parseMail, type ParsedMail } from '../../server/utils/mime'
import { waitFor } from './jobs'

/** Waits for the n-th (1-based) mail to `to` whose subject contains `subject`. */
export async function waitForMail(pool: pg.Pool, to: string, subject: string, n = 1, timeoutMs = 20_000): Promise<ParsedMail> {
  return waitFor(`mail "${subject}" to ${to}`, async () => {
    const { rows } = await pool.query(
      `SELECT raw FROM mailbox_messages WHERE rcpt_to ? $1 AND subject LIKE '%' || $2 || '%' ORDER BY received_at`, [to.toLowerCase(), subject])
    return rows.length >= n ? await parseMail(rows[n - 1].raw as string) : null
  }, timeoutMs)
}

export async function mailCount(pool: pg.Pool, to: string): Promise<number> {
  const { rows } = await pool.query(`SELECT count(*)::int AS n FROM mailbox_messages WHERE rcpt_to ? $1`, [to.toLowerCase()])
  return rows[0].n as number
}

/** The first link in the mail's text that contains `part`. */
export function linkIn(mail: ParsedMail, part: string): string {
  const m = mail.text.match(new RegExp(`https?://\\S*${part}\\S*`))
  if (!m) throw new Error(`no link with ${part} in mail:\n${mail.text}`)
  return m[0]
}

/** Raw request helper for uploads and bearer tokens (ApiClient speaks JSON only). */
export async function rawRequest(baseUrl: string, method: string, path: string, opts: { body?: string | Uint8Array; headers?: Record<string, string> } = {}) {
  const res = await fetch(baseUrl + path, { method, headers: opts.headers, body: opts.body, redirect: 'manual' })
  const text = await res.text()
  let body: any = text
  try { body = text ? JSON.parse(text) : null } catch { /* keep text */ }
  return { status: res.status, body, headers: res.headers, bytes: text }
}
