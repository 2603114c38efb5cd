// Progress relay for the SSE routes: one LISTEN connection per server process on the progress channel; workers
// anywhere NOTIFY with a run id, and the run's state is read once and handed to every open stream of that run.
// Bursts of notifications (many batches landing at once) are folded into one read per run every 200 ms at the
// most; reads asked for while one is under way share it. No stream holds a database connection.
import { listen, type Listener } from '../queue/listen'
import { CHANNEL_PROGRESS } from '../queue/config'
import { runProgress } from '../runs/progress'

export type RunState = NonNullable<Awaited<ReturnType<typeof runProgress>>>
type Callback = (state: RunState) => void
const subscribers = new Map<string, Set<Callback>>()
const pending = new Map<string, ReturnType<typeof setTimeout>>()
let listener: Listener | null = null

const reading = new Map<string, Promise<RunState | null>>()

/** The run's state, one query for all who ask at the same time; null when the run is gone or the read failed. */
export function readRunState(runId: string): Promise<RunState | null> {
  let p = reading.get(runId)
  if (!p) {
    p = runProgress(runId).catch(() => null).finally(() => reading.delete(runId))
    reading.set(runId, p)
  }
  return p
}

function fire(runId: string) {
  if (pending.has(runId)) return
  pending.set(runId, setTimeout(() => {
    pending.delete(runId)
    if (!subscribers.get(runId)?.size) return
    void readRunState(runId).then((state) => {
      if (state) for (const cb of subscribers.get(runId) ?? []) cb(state)
    })
  }, 200))
}

function ensureListener() {
  listener ??= listen([CHANNEL_PROGRESS], (_ch, runId) => fire(runId), () => {
    // After a reconnect, notifications may have been missed: every stream re-reads.
    for (const runId of subscribers.keys()) fire(runId)
  })
}

export function subscribeProgress(runId: string, cb: Callback): () => void {
  ensureListener()
  let set = subscribers.get(runId)
  if (!set) subscribers.set(runId, (set = new Set()))
  set.add(cb)
  return () => {
    set.delete(cb)
    if (set.size === 0) subscribers.delete(runId)
  }
}

export async function closeProgressRelay() {
  for (const t of pending.values()) clearTimeout(t)
  pending.clear()
  await listener?.close()
  listener = null
}
