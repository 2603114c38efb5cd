// Progress relay for the SSE routes: one LISTEN connection per server process on the progress channel; workers
// anywhere NOTIFY with a run id, and every open stream of that run re-reads the run's state. Bursts of
// notifications (many batches landing at once) are folded into one read per run every 200 ms at the most.
import { listen, type Listener } from '../jobs/listen'
import { CHANNEL_PROGRESS } from '../jobs/config'

type Callback = () => void
const subscribers = new Map<string, Set<Callback>>()
const pending = new Map<string, ReturnType<typeof setTimeout>>()
let listener: Listener | null = null

function fire(runId: string) {
  if (pending.has(runId)) return
  pending.set(runId, setTimeout(() => {
    pending.delete(runId)
    for (const cb of subscribers.get(runId) ?? []) cb()
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
