import { defineStore } from 'pinia'

/** Client state shared across the planning pages: which site is selected and where the map looks. Not a copy of server data. */
export const usePlanningStore = defineStore('planning', () => {
  const selectedSiteId = ref<number | null>(null)
  const addByClick = ref(false)
  const mapView = ref<{ center: [number, number]; zoom: number } | null>(null)
  function select(id: number | null) { selectedSiteId.value = id }
  return { selectedSiteId, addByClick, mapView, select }
})
