// A small reader of the messages Lensfield itself sends (nodemailer output): headers, RFC 2047 encoded words,
// multipart/alternative, quoted-printable and base64 bodies. Enough for the development mailbox and the tests; it
// is not a general MIME parser (no nested attachments, no charsets other than UTF-8/ASCII).

export interface ParsedMail {
  headers: Record<string, string>
  subject: string
  from: string
  to: string
  text: string
  html: string
}

function splitHead(raw: string): { head: string; body: string } {
  const m = /\r?\n\r?\n/.exec(raw)
  if (!m) return { head: raw, body: '' }
  return { head: raw.slice(0, m.index), body: raw.slice(m.index + m[0].length) }
}

function parseHeaders(head: string): Record<string, string> {
  const out: Record<string, string> = {}
  // Unfold continuation lines (RFC 5322 §2.2.3) before splitting.
  for (const line of head.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const i = line.indexOf(':')
    if (i > 0) out[line.slice(0, i).trim().toLowerCase()] = line.slice(i + 1).trim()
  }
  return out
}

export function decodeQuotedPrintable(s: string): string {
  const bytes: number[] = []
  const text = s.replace(/=\r?\n/g, '')
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!
    if (c === '=' && /^[0-9A-Fa-f]{2}$/.test(text.slice(i + 1, i + 3))) {
      bytes.push(parseInt(text.slice(i + 1, i + 3), 16))
      i += 2
    } else {
      for (const b of Buffer.from(c, 'utf8')) bytes.push(b)
    }
  }
  return Buffer.from(bytes).toString('utf8')
}

/** RFC 2047 encoded words (=?UTF-8?Q?…?= / =?UTF-8?B?…?=). */
export function decodeEncodedWords(s: string): string {
  return s.replace(/=\?([^?]+)\?([QqBb])\?([^?]*)\?=(\s+(?==\?))?/g, (_m, _cs, enc: string, data: string) =>
    enc.toUpperCase() === 'B' ? Buffer.from(data, 'base64').toString('utf8') : decodeQuotedPrintable(data.replace(/_/g, ' ')))
}

function decodeBody(body: string, encoding: string | undefined): string {
  const e = (encoding ?? '7bit').toLowerCase()
  if (e === 'quoted-printable') return decodeQuotedPrintable(body)
  if (e === 'base64') return Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8')
  return body
}

function collect(raw: string, out: { text: string; html: string }) {
  const { head, body } = splitHead(raw)
  const h = parseHeaders(head)
  const type = h['content-type'] ?? 'text/plain'
  const boundary = /boundary="?([^";]+)"?/i.exec(type)?.[1]
  if (/^multipart\//i.test(type) && boundary) {
    const parts = body.split(`--${boundary}`)
    for (const part of parts.slice(1)) {
      if (part.startsWith('--')) break
      collect(part.replace(/^\r?\n/, ''), out)
    }
    return
  }
  const decoded = decodeBody(body, h['content-transfer-encoding']).replace(/\r\n/g, '\n').trimEnd()
  if (/^text\/html/i.test(type)) out.html ||= decoded
  else if (/^text\/plain/i.test(type)) out.text ||= decoded
}

export function parseMail(raw: string): ParsedMail {
  const { head } = splitHead(raw)
  const headers = parseHeaders(head)
  const out = { text: '', html: '' }
  collect(raw, out)
  return {
    headers,
    subject: decodeEncodedWords(headers.subject ?? ''),
    from: decodeEncodedWords(headers.from ?? ''),
    to: decodeEncodedWords(headers.to ?? ''),
    ...out,
  }
}
