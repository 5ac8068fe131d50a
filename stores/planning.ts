import { defineStore } from 'pinia'

/** Client state shared across the planning pages: which site is selected and whether clicks add sites. Not a copy of server data. */
export const usePlanningStore = defineStore('planning', () => {
  const selectedSiteId = ref<number | null>(null)
  const addByClick = ref(false)
  function select(id: number | null) { selectedSiteId.value = id }
  return { selectedSiteId, addByClick, select }
})
