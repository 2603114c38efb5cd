// The arithmetic behind the queue figures of bench/scale-out.ts and the README's fleet example: pure functions of
// measured quantities, so the README's numbers can be re-derived from a new measurement (tests/unit/queue-sizing.test.ts).

/** What one timed run through the queue measured. */
export interface QueueRunMeasure {
  /** From "created" to "done". */
  wallSeconds: number
  /** Tracing threads serving the queue (all worker processes together). */
  threads: number
  /** Summed trace time of the run's batches on those threads (run_batches.compute_ms). */
  computeSeconds: number
  jobs: number
  rays: number
}

export interface QueueOverhead {
  /** Share of the threads' wall time not spent tracing: fetching jobs, committing tallies, idle tails. */
  fraction: number
  /** Thread-seconds of queue time per job. */
  perJobSeconds: number
  /** Trace time per ray on one thread. */
  secondsPerRay: number
  /** Jobs the run moved per second of wall time. */
  jobsPerSecond: number
}

export function queueOverhead(m: QueueRunMeasure): QueueOverhead {
  for (const [k, v] of Object.entries(m)) {
    if (!(Number.isFinite(v) && v > 0)) throw new Error(`queueOverhead: ${k} must be a positive number, got ${v}`)
  }
  const threadSeconds = m.wallSeconds * m.threads
  const idle = Math.max(0, threadSeconds - m.computeSeconds)
  return {
    fraction: idle / threadSeconds,
    perJobSeconds: idle / m.jobs,
    secondsPerRay: m.computeSeconds / m.rays,
    jobsPerSecond: m.jobs / m.wallSeconds,
  }
}

/**
 * The smallest batch (rays per job) whose queue time is at most `fraction` of its trace time:
 * perJob ≤ fraction · batch · secondsPerRay, rounded up to a whole 1 000 rays.
 */
export function batchRaysForOverhead(perJobSeconds: number, secondsPerRay: number, fraction = 0.05): number {
  if (!(perJobSeconds >= 0) || !(secondsPerRay > 0) || !(fraction > 0 && fraction < 1)) {
    throw new Error('batchRaysForOverhead: perJobSeconds ≥ 0, secondsPerRay > 0 and 0 < fraction < 1 are needed')
  }
  return Math.max(1000, Math.ceil(perJobSeconds / (fraction * secondsPerRay) / 1000) * 1000)
}

export interface FleetInput {
  machines: number
  /** Tracing threads per machine (`npm run worker -- --threads N`). */
  threadsPerMachine: number
  batchRays: number
  /** Trace time per ray on one thread of a worker machine. */
  secondsPerRay: number
  /** Connections one worker process holds open while busy (measured: pg_stat_activity). */
  connectionsPerProcess: number
  /** PostgreSQL CPU seconds per job (measured on the bench's server). */
  databaseCpuSecondsPerJob: number
  /** Idle polling interval of each subscription (LENSFIELD_QUEUE_POLL_SECONDS). */
  pollingSeconds: number
  /** Connections kept for the web server(s), migrations and an operator (added to max_connections). */
  reservedConnections: number
}

export interface FleetSizing {
  threads: number
  /** Seconds one batch takes on one thread. */
  batchSeconds: number
  /** Jobs the fleet finishes per second when every thread is busy. */
  jobsPerSecond: number
  /** Rays the fleet traces per second when busy. */
  raysPerSecond: number
  /** Connections the workers hold, and a max_connections that fits them with the reserve. */
  connections: number
  maxConnections: number
  /** Queue look-ups per second while every thread is idle (each subscription polls). */
  idlePollsPerSecond: number
  /** PostgreSQL cores kept busy by the jobs when every thread is busy. */
  databaseCores: number
}

export function fleetSizing(f: FleetInput): FleetSizing {
  for (const [k, v] of Object.entries(f)) {
    if (!(Number.isFinite(v) && v >= 0)) throw new Error(`fleetSizing: ${k} must be a number ≥ 0, got ${v}`)
  }
  if (!(f.secondsPerRay > 0) || !(f.pollingSeconds > 0)) throw new Error('fleetSizing: secondsPerRay and pollingSeconds must be > 0')
  const threads = f.machines * f.threadsPerMachine
  const batchSeconds = f.batchRays * f.secondsPerRay
  const jobsPerSecond = threads / batchSeconds
  const connections = Math.ceil(f.machines * f.connectionsPerProcess)
  return {
    threads,
    batchSeconds,
    jobsPerSecond,
    raysPerSecond: threads / f.secondsPerRay,
    connections,
    // Rounded up to a multiple of 50 above what is needed.
    maxConnections: Math.ceil((connections + f.reservedConnections) / 50) * 50,
    idlePollsPerSecond: threads / f.pollingSeconds,
    databaseCores: jobsPerSecond * f.databaseCpuSecondsPerJob,
  }
}
