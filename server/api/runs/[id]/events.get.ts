// Server-Sent Events: the run's current state first, then a new state whenever a worker reports, and a heartbeat
// every 15 s so proxies keep the stream open. Ends by itself once the run has ended. The state is read once per
// run for all its streams (server/utils/progress.ts); streams per session and per address are capped (429,
// server/utils/stream-limits.ts).
import { idParamSchema } from '#shared/types/project'
import { readRunState, subscribeProgress, type RunState } from '~~/server/utils/progress'
import { takeStreamSlot } from '~~/server/utils/stream-limits'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireRunRole(event, id, ANY_ROLE)
  const release = takeStreamSlot(event)
  const stream = createEventStream(event)
  let closed = false
  let sending = Promise.resolve()
  const send = (state: RunState | null) => {
    sending = sending.then(async () => {
      if (!state || closed) return
      await stream.push({ event: 'progress', data: JSON.stringify(state) })
      if (!isOpenStatus(state.status)) {
        await stream.push({ event: 'end', data: state.status })
        closed = true
        await stream.close()
      }
    }).catch(() => {})
  }
  const unsubscribe = subscribeProgress(id, send)
  const heartbeat = setInterval(() => { void stream.push({ event: 'heartbeat', data: new Date().toISOString() }).catch(() => {}) }, 15_000)
  stream.onClosed(() => {
    closed = true
    release()
    unsubscribe()
    clearInterval(heartbeat)
  })
  void readRunState(id).then(send)
  return stream.send()
})
