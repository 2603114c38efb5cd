// Run, cell and batch states, the one list for app pages, the progress stream and the worker. A run or cell that is
// queued or running is open (still changing); every other state is final.

export const RUN_STATUSES = ['queued', 'running', 'done', 'cancelled', 'failed'] as const
export type RunStatus = (typeof RUN_STATUSES)[number]

/** States in which a run or cell is still being traced (its progress may change). */
export const OPEN_STATUSES = ['queued', 'running'] as const
export type OpenStatus = (typeof OPEN_STATUSES)[number]

/** True while a run or cell is queued or running. */
export function isOpenStatus(status: string | null | undefined): status is OpenStatus {
  return (OPEN_STATUSES as readonly string[]).includes(status ?? '')
}
