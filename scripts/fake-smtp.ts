// The fake SMTP server of development, demo and tests: smtp-server on loopback at a free port, accepting every
// message (no authentication, no TLS) and storing it in the mailbox_messages table of the app's database, where
// /dev/mailbox (demo/development mode only) and the tests read it. Nothing leaves the machine.
import pg from 'pg'
import { SMTPServer } from 'smtp-server'
import { freePort } from './postgres'
import { parseMail } from '../server/utils/mime'

export interface FakeSmtp {
  port: number
  /** Environment for the app and workers: nodemailer's target is this server. */
  env: Record<string, string>
  close(): Promise<void>
}

/** Largest message kept; Lensfield's own mails are a few kB. */
const MAX_MESSAGE_BYTES = 2 * 1024 * 1024

export async function startFakeSmtp(databaseUrl: string, host = '127.0.0.1'): Promise<FakeSmtp> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 })
  // An idle client dies when Postgres restarts (the fault tests stop it on purpose): log it, do not crash the host
  // process; the next message opens a new connection.
  pool.on('error', (err) => console.error('[mailbox] database connection lost:', err.message))
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['AUTH', 'STARTTLS'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Lensfield development mailbox (messages are kept, never delivered)',
    onData(stream, session, callback) {
      const chunks: Buffer[] = []
      stream.on('data', (c: Buffer) => chunks.push(c))
      stream.on('end', () => {
        const raw = Buffer.concat(chunks).toString('utf8')
        const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : ''
        const to = session.envelope.rcptTo.map((r) => r.address.toLowerCase())
        // The decoded subject is stored beside the raw message, so the tests and the mailbox can filter on it.
        parseMail(raw)
          .then(({ subject }) => pool.query('INSERT INTO mailbox_messages (mail_from, rcpt_to, subject, raw) VALUES ($1, $2, $3, $4)',
            [from, JSON.stringify(to), subject, raw]))
          .then(() => callback(), (err: Error) => callback(err))
      })
    },
  })
  const port = await freePort()
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject)
    server.listen(port, host, () => resolve())
  })
  server.on('error', (err) => console.error('[mailbox]', err.message))
  return {
    port,
    env: { LENSFIELD_SMTP_HOST: host, LENSFIELD_SMTP_PORT: String(port), LENSFIELD_SMTP_SECURE: 'false', LENSFIELD_MAIL_FROM: 'Lensfield <lensfield@localhost>' },
    async close() {
      await new Promise<void>((r) => server.close(() => r()))
      await pool.end()
    },
  }
}
