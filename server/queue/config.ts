// Settings of the job system, from the environment with defaults sized for these 2-core machines.
// Plain module: the web server's embedded worker and `npm run worker` read the same values.

function envInt(name: string, fallback: number, min: number): number {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const v = Number(raw)
  if (!Number.isInteger(v) || v < min) throw new Error(`${name} must be a whole number ≥ ${min}: got ${raw}`)
  return v
}

function envNumber(name: string, fallback: number, min: number): number {
  const raw = process.env[name]
  if (raw === undefined || raw === '') return fallback
  const v = Number(raw)
  if (!Number.isFinite(v) || v < min) throw new Error(`${name} must be a number ≥ ${min}: got ${raw}`)
  return v
}

export const QUEUE_BATCH = 'lensfield-trace-batch'
export const QUEUE_DEAD = 'lensfield-trace-batch-dead'
/** NOTIFY channels; payloads carry ids only. */
export const CHANNEL_PROGRESS = 'lensfield_progress'
export const CHANNEL_CANCEL = 'lensfield_cancel'

export function jobSettings() {
  return {
    /** Rays in one queued batch: a batch takes seconds on one thread, so a lost worker costs little. */
    batchRays: envInt('LENSFIELD_BATCH_RAYS', 200_000, 1000),
    /** A batch not finished in this time is taken from its worker and retried (pg-boss expiry). */
    expireSeconds: envInt('LENSFIELD_JOB_EXPIRE_SECONDS', 120, 1),
    retryLimit: envInt('LENSFIELD_JOB_RETRY_LIMIT', 4, 0),
    /**
     * Interface/reflector encounters one batch may spend (device and companion together); rays past it are counted
     * unresolved. Default: 10⁶ per second of expiry, i.e. a quarter of the expiry at 4·10⁶ encounters/s, the slowest
     * rate measured here (hex caps, air search on every encounter; 22·10⁶/s on flat stacks), so a batch ends well
     * within its expiry even with the batch's chunks queued behind other batches on the same thread.
     */
    batchEvents: envInt('LENSFIELD_BATCH_EVENTS', 1_000_000 * envInt('LENSFIELD_JOB_EXPIRE_SECONDS', 120, 1), 1000),
    retryDelaySeconds: envInt('LENSFIELD_JOB_RETRY_DELAY_SECONDS', 2, 0),
    /** How often pg-boss looks for expired jobs. */
    maintenanceSeconds: envInt('LENSFIELD_QUEUE_MAINTENANCE_SECONDS', 30, 1),
    /**
     * Per-team limit on rays waiting to be traced: a new run or sweep is refused when its cost plus what the team
     * already has queued would pass it. Cost counts the device and its planar companion.
     */
    teamRayLimit: envInt('LENSFIELD_TEAM_RAY_LIMIT', 1_000_000_000, 1000),
    /**
     * How often an idle worker's subscription (one per thread) asks the queue for work, in seconds (pg-boss allows
     * 0.5 at the least). A busy subscription asks again as soon as its batch is done; many idle machines on one
     * database poll it 1/pollingSeconds times a second each per thread, so a large fleet raises it (README).
     */
    /**
     * Batches a worker process holds beyond one per tracing thread (LENSFIELD_WORKER_PREFETCH, default 0): with 1,
     * the next batch is already queued on the pool while one commits, so queue and commit time no longer idle the
     * threads (bench/scale-out.ts); a worker that dies then hands back one more batch to expiry.
     */
    prefetch: envInt('LENSFIELD_WORKER_PREFETCH', 0, 0),
    pollingSeconds: envNumber('LENSFIELD_QUEUE_POLL_SECONDS', 0.5, 0.5),
  }
}
