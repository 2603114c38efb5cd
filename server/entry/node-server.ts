// The production server entry: Nitro's node-server entry (nitropack/dist/presets/node/runtime/node-server.mjs)
// with connection limits, which that entry has no options for. Set in nuxt.config.ts for production builds only.
//
// - headersTimeout / requestTimeout: a client gets LENSFIELD_HEADERS_TIMEOUT_MS (10 s) to send its headers and
//   LENSFIELD_REQUEST_TIMEOUT_MS (30 s) for the whole request with its body, instead of Node's 60 s / 300 s; a
//   socket that sends nothing is closed after the headers timeout too. Responses (SSE streams) are not limited.
// - keepAliveTimeout: an idle kept-alive socket closes after LENSFIELD_KEEP_ALIVE_TIMEOUT_MS (5 s).
// - LENSFIELD_MAX_CONNECTIONS_PER_ADDRESS (256) open sockets per client address; more are closed at once, so one
//   client holding thousands of idle sockets cannot crowd out the others (nor /api/health).
import '#nitro-internal-pollyfills'
import { Server as HttpServer } from 'node:http'
import type { Socket } from 'node:net'
import { toNodeListener } from 'h3'
import { useNitroApp } from 'nitropack/runtime'
// The two files behind Nitro's 'nitropack/runtime/internal' barrel, which has no type declarations of its own.
import { setupGracefulShutdown } from 'nitropack/runtime/internal/shutdown'
import { trapUnhandledNodeErrors } from 'nitropack/runtime/internal/utils'
import { connectionLimitsFromEnv } from '../utils/connection-limits'

const limits = connectionLimitsFromEnv(process.env)
const nitroApp = useNitroApp()
const server = new HttpServer({
  headersTimeout: limits.headersTimeoutMs,
  requestTimeout: limits.requestTimeoutMs,
  keepAliveTimeout: limits.keepAliveTimeoutMs,
  // How often Node checks the two timeouts above (default 30 s would let a slow client overstay by that much).
  connectionsCheckingInterval: 1000,
}, toNodeListener(nitroApp.h3App))

const openPerAddress = new Map<string, number>()
server.on('connection', (socket: Socket) => {
  const address = socket.remoteAddress ?? ''
  const open = openPerAddress.get(address) ?? 0
  if (open >= limits.maxConnectionsPerAddress) {
    socket.destroy()
    return
  }
  openPerAddress.set(address, open + 1)
  socket.once('close', () => {
    const left = (openPerAddress.get(address) ?? 1) - 1
    if (left > 0) openPerAddress.set(address, left)
    else openPerAddress.delete(address)
  })
})

const port = Number(process.env.NITRO_PORT || process.env.PORT || 3000)
const host = process.env.NITRO_HOST || process.env.HOST
const listener = server.listen({ port, host }, () => {
  const a = listener.address()
  if (a && typeof a === 'object') console.log(`Listening on http://${a.family === 'IPv6' ? `[${a.address}]` : a.address}:${a.port}`)
})
trapUnhandledNodeErrors()
setupGracefulShutdown(listener, nitroApp)

export default {}
