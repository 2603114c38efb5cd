// Server-Sent Events: the run's current state first, then a new state whenever a worker reports, and a heartbeat
// every 15 s so proxies keep the stream open. Ends by itself once the run has ended.
import { idParamSchema } from '../../../../shared/types/project'
import { runProgress } from '../../../jobs/runs'

export default defineApiHandler(async (event) => {
  const { id } = await getValidatedRouterParams(event, zodValidator(idParamSchema))
  await requireRunRole(event, id, ANY_ROLE)
  const stream = createEventStream(event)
  let closed = false
  let sending = Promise.resolve()
  const send = () => {
    sending = sending.then(async () => {
      if (closed) return
      const state = await runProgress(id).catch(() => null)
      if (!state || closed) return
      await stream.push({ event: 'progress', data: JSON.stringify(state) })
      if (!['queued', 'running'].includes(state.status)) {
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
    unsubscribe()
    clearInterval(heartbeat)
  })
  send()
  return stream.send()
})
