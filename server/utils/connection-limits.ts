// Connection limits of the production server (server/entry/node-server.ts), read from the environment.
export interface ConnectionLimits {
  headersTimeoutMs: number
  requestTimeoutMs: number
  keepAliveTimeoutMs: number
  maxConnectionsPerAddress: number
}

function positive(env: Record<string, string | undefined>, name: string, fallback: number, zeroAllowed = false): number {
  const raw = env[name]
  if (raw === undefined || raw === '') return fallback
  const n = Number(raw)
  if (!Number.isInteger(n) || n < 0 || (n === 0 && !zeroAllowed)) throw new Error(`${name} must be a positive whole number, not "${raw}".`)
  return n
}

export function connectionLimitsFromEnv(env: Record<string, string | undefined>): ConnectionLimits {
  const headersTimeoutMs = positive(env, 'LENSFIELD_HEADERS_TIMEOUT_MS', 10_000)
  // Node requires requestTimeout ≥ headersTimeout.
  const requestTimeoutMs = Math.max(headersTimeoutMs, positive(env, 'LENSFIELD_REQUEST_TIMEOUT_MS', 30_000))
  return {
    headersTimeoutMs,
    requestTimeoutMs,
    keepAliveTimeoutMs: positive(env, 'LENSFIELD_KEEP_ALIVE_TIMEOUT_MS', 5_000),
    // 0 turns the cap off: behind a reverse proxy every socket comes from the proxy, which should limit instead.
    maxConnectionsPerAddress: positive(env, 'LENSFIELD_MAX_CONNECTIONS_PER_ADDRESS', 256, true) || Infinity,
  }
}
