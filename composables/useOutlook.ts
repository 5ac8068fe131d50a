import type { Ref } from 'vue'
import type { Outlook as ServerOutlook } from '~~/server/services/forecasts'

/** The forecast outlook as GET /api/trips/{id}/outlook returns it (types from the service itself). */
export type Outlook = ServerOutlook
export type OutlookSite = Outlook['sites'][number]

export function useOutlook(tripId: Ref<number>) {
  return useFetch<Outlook>(() => `/api/trips/${tripId.value}/outlook`, { key: computed(() => `outlook:${tripId.value}`) })
}
