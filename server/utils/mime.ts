// Reading the messages the fake SMTP server captured (scripts/fake-smtp.ts), for the development mailbox and the
// tests: mailparser's simpleParser (headers, RFC 2047 encoded words, multipart, quoted-printable, base64, charsets).

import { simpleParser, type AddressObject } from 'mailparser'

export interface ParsedMail {
  subject: string
  from: string
  to: string
  text: string
  html: string
}

function addresses(a: AddressObject | AddressObject[] | undefined): string {
  if (!a) return ''
  return (Array.isArray(a) ? a : [a]).map((x) => x.text).join(', ')
}

/** Subject, sender, recipients, and the text and HTML bodies of one raw RFC 5322 message. */
export async function parseMail(raw: string | Buffer): Promise<ParsedMail> {
  const m = await simpleParser(raw, { skipImageLinks: true, skipTextLinks: true })
  return {
    subject: m.subject ?? '',
    from: addresses(m.from),
    to: addresses(m.to),
    text: (m.text ?? '').replace(/\r\n/g, '\n').trimEnd(),
    html: typeof m.html === 'string' ? m.html.replace(/\r\n/g, '\n').trimEnd() : '',
  }
}
