// Live progress of a run or sweep over Server-Sent Events (GET /api/{runs|sweeps}/:id/events). The state is
// whatever the server last pushed; the stream closes itself after 'end'. Browser only (EventSource).
export interface ProgressCell { cellIndex: number; status: string; raysDone: number; value: { value: number; stdErr: number } | null }
export interface RunProgress {
  runId: string
  status: string
  cellsTotal: number
  cellsFinished: number
  cellsDone: number
  raysPlanned: number
  raysDone: number
  bestCell: { cellIndex: number; figure: string; value: number; stdErr: number } | null
  errors: Array<{ cellIndex: number; error: string }>
  runError?: string | null
  startedAt?: string | null
  cells: ProgressCell[]
}

export function useRunProgress(kind: 'runs' | 'sweeps', id: Ref<string>, initial: Ref<RunProgress | null | undefined>) {
  const progress = ref<RunProgress | null>(initial.value ?? null)
  const connected = ref(false)
  const ended = ref(false)
  let source: EventSource | null = null

  function close() {
    source?.close()
    source = null
    connected.value = false
  }
  function open() {
    close()
    if (typeof EventSource === 'undefined') return
    if (progress.value && !isOpenStatus(progress.value.status)) { ended.value = true; return }
    source = new EventSource(`/api/${kind}/${id.value}/events`)
    source.addEventListener('open', () => { connected.value = true })
    source.addEventListener('progress', (e) => { progress.value = JSON.parse((e as MessageEvent).data) })
    source.addEventListener('end', () => { ended.value = true; close() })
    // EventSource reconnects by itself after a network error; nothing to do here
  }
  onMounted(open)
  onBeforeUnmount(close)
  watch(id, open)
  return { progress, connected, ended, reopen: open }
}
