import { defineStore } from 'pinia'

export interface BestGroundSearch { lat: number; lon: number; radiusKm: number; limit: number; minSunAltitudeDeg: number; minSeparationKm?: number }

/**
 * Client state shared across the planning page's map and panels: the selected site, whether clicks
 * add sites or pick a search centre, whether the expected-seen layer is on, and the best-ground
 * search being shown. Not a copy of server data.
 */
export const usePlanningStore = defineStore('planning', () => {
  const selectedSiteId = ref<number | null>(null)
  const addByClick = ref(false)
  const surfaceOn = ref(false)
  const picking = ref(false)
  const search = ref<BestGroundSearch | null>(null)
  function select(id: number | null) { selectedSiteId.value = id }
  return { selectedSiteId, addByClick, surfaceOn, picking, search, select }
})
