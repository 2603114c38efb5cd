// Uploaded tables for the editor: the project's list (by kind) and the rows of the tables a design refers to by
// id, fetched once per page visit (useState, so nothing is shared between server-rendered requests).
import type { RefTable } from '#shared/types/table-refs'

export interface TableListItem { id: string; kind: string; name: string; rowCount: number; fileName?: string | null }

/** The project's uploaded tables (loaded on the client on first use). */
export function useProjectTables(projectId: () => string | undefined) {
  const lists = useState<Record<string, TableListItem[] | 'loading' | { error: string }>>('lf-project-tables', () => ({}))
  async function load(force = false) {
    const id = projectId()
    if (!id || !import.meta.client) return
    if (!force && lists.value[id] !== undefined) return
    lists.value[id] = 'loading'
    try {
      const r = await $fetch<{ tables: TableListItem[] }>(`/api/projects/${id}/tables`)
      lists.value[id] = r.tables
    } catch (e) {
      lists.value[id] = { error: errorMessage(e) }
    }
  }
  const state = computed(() => { const id = projectId(); return id ? lists.value[id] : undefined })
  const ofKind = (kind: string) => { const s = state.value; return Array.isArray(s) ? s.filter((t) => t.kind === kind) : [] }
  const error = computed(() => { const s = state.value; return s && typeof s === 'object' && 'error' in s ? s.error : '' })
  return { load, ofKind, error, loaded: computed(() => Array.isArray(state.value)) }
}

/** Rows of referenced tables: `load(id)` fetches once; `lookup` gives the table once it is here. */
export function useTableRows() {
  const rows = useState<Record<string, RefTable | 'loading' | { error: string }>>('lf-table-rows', () => ({}))
  function load(id: string) {
    if (!import.meta.client || rows.value[id] !== undefined) return
    rows.value[id] = 'loading'
    $fetch<{ table: { id: string; kind: string; name: string; rows: number[][] } }>(`/api/tables/${id}`)
      .then((r) => { rows.value[id] = { id: r.table.id, kind: r.table.kind, name: r.table.name, rows: r.table.rows } })
      .catch((e) => { rows.value[id] = { error: errorMessage(e) } })
  }
  const lookup = (id: string): RefTable | undefined => { const t = rows.value[id]; return t && typeof t === 'object' && 'rows' in t ? t : undefined }
  /** Not fetched yet or on its way (a failed fetch is not pending: the table reads as unknown). */
  const isPending = (id: string) => rows.value[id] === undefined || rows.value[id] === 'loading'
  return { load, lookup, isPending }
}
