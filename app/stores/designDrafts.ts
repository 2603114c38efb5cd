// Client UI state only: unsaved editor drafts by design id, kept in sessionStorage so leaving the editor (or
// reloading the tab) does not lose them. The saved design itself always comes from the server.
import { defineStore } from 'pinia'

export interface DesignDraft { baseVersion: number; name: string; scenario: unknown; savedAt: number }
const KEY = 'lensfield.designDrafts'

export const useDesignDraftsStore = defineStore('designDrafts', () => {
  const drafts = ref<Record<string, DesignDraft>>({})
  let loaded = false
  function ensureLoaded() {
    if (loaded || typeof sessionStorage === 'undefined') return
    try { drafts.value = JSON.parse(sessionStorage.getItem(KEY) ?? '{}') } catch { drafts.value = {} }
    loaded = true
  }
  function persist() {
    if (typeof sessionStorage !== 'undefined') sessionStorage.setItem(KEY, JSON.stringify(drafts.value))
  }
  function get(id: string): DesignDraft | null {
    ensureLoaded()
    return drafts.value[id] ?? null
  }
  function put(id: string, draft: Omit<DesignDraft, 'savedAt'>) {
    ensureLoaded()
    drafts.value[id] = { ...draft, savedAt: Date.now() }
    persist()
  }
  function drop(id: string) {
    ensureLoaded()
    drafts.value = Object.fromEntries(Object.entries(drafts.value).filter(([key]) => key !== id))
    persist()
  }
  return { drafts, get, put, drop }
})
