import type { Ref } from 'vue'
import type { TripBriefing } from '~~/server/services/briefing'

/** The traveller's briefing for a trip's site, as GET /api/trips/{id}/briefing returns it (types from the service). */
export type Briefing = TripBriefing

export function useBriefing(tripId: Ref<number>, siteId: Ref<number | undefined>) {
  return useFetch<Briefing>(() => `/api/trips/${tripId.value}/briefing`, {
    query: computed(() => (siteId.value ? { siteId: siteId.value } : {})),
    key: computed(() => `briefing:${tripId.value}:${siteId.value ?? 'primary'}`),
  })
}
