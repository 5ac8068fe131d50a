import type { Ref } from 'vue'
import type { myGuidedTrips, tripGuides } from '~~/server/services/tripOps'

export type GuidedTrip = Awaited<ReturnType<typeof myGuidedTrips>>['data'][number]
export type TripGuide = Awaited<ReturnType<typeof tripGuides>>['data'][number]

/** "My trips": the trips the signed-in guide is assigned to (all trips for an organiser). */
export function useGuidedTrips() {
  return useFetch<{ data: GuidedTrip[]; meta: { total: number } }>('/api/me/trips', { key: 'guided-trips' })
}

/** Guide accounts and whether each guides this trip (organisers). */
export function useTripGuides(id: Ref<number>) {
  return useFetch<{ data: TripGuide[]; meta: { assigned: number } }>(() => `/api/trips/${id.value}/guides`, { key: computed(() => `trip-guides:${id.value}`) })
}

/** The 409 codes of trip and site changes, read from a $fetch error. */
export function conflictOf(e: unknown): { code?: string; message: string; data: Record<string, unknown> } {
  const d = (e as { data?: { message?: string; data?: Record<string, unknown> } }).data
  return { code: d?.data?.code as string | undefined, message: d?.message ?? serverMessage(e), data: d?.data ?? {} }
}

/**
 * A site write that may need the organiser's say-so: when the server answers 409 confirm_needed
 * (a trip with bookings uses the site), its message (naming trips and travellers) is shown in a
 * confirmation dialog and, if accepted, the write is sent again with ?confirm=true.
 */
export async function siteWrite<T>(url: string, opts: { method: 'PATCH' | 'DELETE'; body?: Record<string, unknown> }): Promise<T | null> {
  const call = $fetch as (u: string, o: object) => Promise<T>
  try {
    return await call(url, opts)
  } catch (e) {
    const c = conflictOf(e)
    if (c.code !== 'confirm_needed') throw e
    if (!window.confirm(c.message)) return null
    return await call(url, { ...opts, query: { confirm: 'true' } })
  }
}
