// Outgoing e-mail through nodemailer. The transport comes from the environment:
//   LENSFIELD_SMTP_HOST, LENSFIELD_SMTP_PORT (587), LENSFIELD_SMTP_SECURE ("true" for implicit TLS, port 465),
//   LENSFIELD_SMTP_USER, LENSFIELD_SMTP_PASSWORD, LENSFIELD_MAIL_FROM ("Lensfield <lensfield@localhost>").
// `npm start`, `npm run dev` and the api tests point it at the fake SMTP server of scripts/fake-smtp.ts on loopback.
// Links in mails start with LENSFIELD_PUBLIC_URL (set it in production: a link built from a request's Host header
// could be steered to another site by whoever sends that header).
// Plain module (no Nitro globals): the stand-alone worker process sends the sweep-finished mail with it too.
import nodemailer, { type Transporter } from 'nodemailer'

let transport: Transporter | null | undefined

function createTransport(): Transporter | null {
  const host = process.env.LENSFIELD_SMTP_HOST
  if (!host) return null
  const port = Number(process.env.LENSFIELD_SMTP_PORT || 587)
  const secure = process.env.LENSFIELD_SMTP_SECURE === 'true'
  const user = process.env.LENSFIELD_SMTP_USER
  const loopback = host === '127.0.0.1' || host === 'localhost' || host === '::1'
  return nodemailer.createTransport({
    host,
    port,
    secure,
    auth: user ? { user, pass: process.env.LENSFIELD_SMTP_PASSWORD ?? '' } : undefined,
    // The fake loopback server speaks plain SMTP; a real relay must offer STARTTLS.
    ignoreTLS: loopback && !secure,
    requireTLS: !loopback && !secure,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
  })
}

export function publicBaseUrl(fallback?: string): string {
  return (process.env.LENSFIELD_PUBLIC_URL || fallback || 'http://127.0.0.1:3000').replace(/\/+$/, '')
}

export interface OutgoingMail {
  to: string
  subject: string
  text: string
  html?: string
}

/** Sends one mail; returns false (and logs) when no SMTP server is configured. Throws when the server refuses. */
export async function sendMail(mail: OutgoingMail): Promise<boolean> {
  transport ??= createTransport()
  if (!transport) {
    console.warn(`[mail] LENSFIELD_SMTP_HOST is not set: not sending "${mail.subject}" to ${mail.to}`)
    return false
  }
  await transport.sendMail({
    from: process.env.LENSFIELD_MAIL_FROM || 'Lensfield <lensfield@localhost>',
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
  })
  return true
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' }[c]!))

/** A short mail of paragraphs and one call-to-action link, as text and as minimal HTML. */
export function composeMail(to: string, subject: string, paragraphs: string[], link: { label: string; url: string }, after: string[] = []): OutgoingMail {
  const text = [...paragraphs, `${link.label}: ${link.url}`, ...after, '— Lensfield'].join('\n\n')
  const html = [
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    `<p><a href="${escapeHtml(link.url)}">${escapeHtml(link.label)}</a></p>`,
    ...after.map((p) => `<p style="color:#64707f">${escapeHtml(p)}</p>`),
    '<p style="color:#64707f">— Lensfield</p>',
  ].join('\n')
  return { to, subject, text, html }
}
