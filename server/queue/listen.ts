// A dedicated PostgreSQL connection that LISTENs on Lensfield's channels and hands each notification (an id) to
// the callback. When the connection drops (the database restarts), it reconnects with a growing pause and tells
// the callback with `reconnected`, so listeners can re-read state they might have missed.
import pg from 'pg'

export interface Listener {
  close(): Promise<void>
}

export function listen(
  channels: string[],
  onNotify: (channel: string, payload: string) => void,
  onReconnect?: () => void,
): Listener {
  let client: pg.Client | null = null
  let closed = false
  let pause = 250
  let everConnected = false

  const connect = async (): Promise<void> => {
    if (closed) return
    const c = new pg.Client({ connectionString: process.env.DATABASE_URL, application_name: 'lensfield-listen' })
    c.on('notification', (m) => { if (m.payload !== undefined) onNotify(m.channel, m.payload) })
    c.on('error', () => { /* handled by 'end' */ })
    c.on('end', () => {
      if (client === c) client = null
      if (!closed) setTimeout(() => { void connect() }, pause)
    })
    try {
      await c.connect()
      for (const ch of channels) await c.query(`LISTEN ${pg.escapeIdentifier(ch)}`)
      if (closed) { await c.end(); return }
      const wasReconnect = everConnected
      everConnected = true
      client = c
      pause = 250
      if (wasReconnect) onReconnect?.()
    } catch {
      pause = Math.min(pause * 2, 5000)
      await c.end().catch(() => {})
    }
  }
  void connect()

  return {
    async close() {
      closed = true
      await client?.end().catch(() => {})
      client = null
    },
  }
}
