import type { Ref } from 'vue'
import type { bestSpots, expectedSeenAt, expectedSeenSurface } from '~~/server/services/bestGround'
import type { listTerrain } from '~~/server/services/terrain'

/** Response types taken from the services behind the routes. */
export type ExpectedSeen = Awaited<ReturnType<typeof expectedSeenSurface>>
export type BestSpots = Awaited<ReturnType<typeof bestSpots>>
export type BestSpot = BestSpots['data'][number]
export type SurfacePoint = Awaited<ReturnType<typeof expectedSeenAt>>
export type TerrainModel = Awaited<ReturnType<typeof listTerrain>>[number]

/** The expected-seen surface, fetched in the browser when the layer is first turned on. */
export function useExpectedSeen(workspaceId: Ref<number>) {
  return useFetch<ExpectedSeen>(() => `/api/workspaces/${workspaceId.value}/expected-seen`, {
    key: computed(() => `expected-seen:${workspaceId.value}`), server: false, immediate: false,
  })
}

/** The best ground near a point; runs when asked (execute), not on every change of the form. */
export function useBestSpots(workspaceId: Ref<number>, query: Ref<{ lat: number; lon: number; radiusKm: number; limit: number; minSunAltitudeDeg: number; minSeparationKm?: number } | null>) {
  return useFetch<BestSpots>(() => `/api/workspaces/${workspaceId.value}/best-spots`, {
    key: computed(() => `best-spots:${workspaceId.value}`), query, server: false, immediate: false, watch: false,
  })
}

export function useTerrainModels(workspaceId: Ref<number>) {
  return useFetch<{ data: TerrainModel[] }>(() => `/api/workspaces/${workspaceId.value}/terrain`, { key: computed(() => `terrain:${workspaceId.value}`) })
}
