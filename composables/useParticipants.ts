import type { Ref } from 'vue'
import type { listParticipants } from '~~/server/services/people/participants'
import type { accessLog, manifest } from '~~/server/services/people/manifest'

/** GET /api/bookings/{id}/participants, as the server builds it. */
export type ParticipantsView = Awaited<ReturnType<typeof listParticipants>>
export type SeatView = ParticipantsView['data'][number]
export type ManifestView = Awaited<ReturnType<typeof manifest>>
export type AccessLogView = Awaited<ReturnType<typeof accessLog>>

export function useParticipants(bookingId: Ref<number>) {
  return useFetch<ParticipantsView>(() => `/api/bookings/${bookingId.value}/participants`, { key: computed(() => `participants:${bookingId.value}`) })
}
export function useManifest(tripId: Ref<number>) {
  return useFetch<ManifestView>(() => `/api/trips/${tripId.value}/manifest`, { key: computed(() => `manifest:${tripId.value}`) })
}
export function useManifestAccessLog(tripId: Ref<number>, opts: { immediate?: boolean } = {}) {
  return useFetch<AccessLogView>(() => `/api/trips/${tripId.value}/manifest/access-log`, { key: computed(() => `manifest-log:${tripId.value}`), immediate: opts.immediate ?? true })
}
