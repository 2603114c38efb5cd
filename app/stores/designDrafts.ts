// Client UI state only: unsaved editor drafts by design id, kept in sessionStorage so leaving the editor (or
// reloading the tab) does not lose them. The saved design itself always comes from the server.
import { defineStore } from 'pinia'

export interface DesignDraft { baseVersion: number; name: string; scenario: unknown; savedAt: number }
const KEY = 'lensfield.designDrafts'

function load(): Record<string, DesignDraft> {
  if (typeof sessionStorage === 'undefined') return {}
  try { return JSON.parse(sessionStorage.getItem(KEY) ?? '{}') } catch { return {} }
}

export const useDesignDraftsStore = defineStore('designDrafts', {
  state: () => ({ drafts: {} as Record<string, DesignDraft>, loaded: false }),
  actions: {
    ensureLoaded() {
      if (this.loaded || typeof window === 'undefined') return
      this.drafts = load()
      this.loaded = true
    },
    get(id: string): DesignDraft | null {
      this.ensureLoaded()
      return this.drafts[id] ?? null
    },
    put(id: string, draft: Omit<DesignDraft, 'savedAt'>) {
      this.ensureLoaded()
      this.drafts[id] = { ...draft, savedAt: Date.now() }
      this.persist()
    },
    drop(id: string) {
      this.ensureLoaded()
      delete this.drafts[id]
      this.persist()
    },
    persist() {
      if (typeof sessionStorage !== 'undefined') sessionStorage.setItem(KEY, JSON.stringify(this.drafts))
    },
  },
})
