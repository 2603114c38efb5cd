// Client UI state only: how the user likes the designs table sorted. Server data comes via useFetch.
import { defineStore } from 'pinia'

export type DesignSort = 'updated' | 'name'

export const useProjectViewStore = defineStore('projectView', {
  state: () => ({ designSort: 'updated' as DesignSort }),
  actions: {
    setDesignSort(sort: DesignSort) {
      this.designSort = sort
    },
  },
})
