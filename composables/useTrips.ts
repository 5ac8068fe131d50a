import type { Ref } from 'vue'
import type { tripDetail } from '~~/server/services/trips'
import type { bookingView } from '~~/server/services/bookings'

/** The trip page's eclipse block, as the server builds it. */
export type TripEclipse = Awaited<ReturnType<typeof tripDetail>>['eclipse']

export interface TripView {
  id: number; title: string; description: string; status: 'draft' | 'published'; eclipseId: string; workspaceId: number
  startDate: string; endDate: string; seats: number; seatsLeft: number; priceMinor: number; depositMinor: number; currency: string
  balanceDueDate: string; cancellationTiers: Array<{ until: string; refundPct: number }>; minGroupSize: number
  meetingPoint: { name: string; lat: number; lon: number; timeUtc: string; local: string; utcOffset: string; zone: string }
  site: { id: number; name: string; lat: number; lon: number; elevationM: number }
  eclipse?: TripEclipse
  /** Sales open for new holds (organisers close them); the viewer: an assigned guide sees their tools. */
  salesOpen?: boolean
  viewer?: { assignedGuide: boolean }
}
/** A booking as GET /api/bookings/{id} returns it (types from the service itself). */
export type BookingView = Awaited<ReturnType<typeof bookingView>>

export function useTrips() {
  return useFetch<{ data: TripView[] }>('/api/trips', { key: 'trips' })
}
export function useTrip(id: Ref<number>) {
  return useFetch<TripView>(() => `/api/trips/${id.value}`, { key: computed(() => `trip:${id.value}`) })
}
export function useMyBookings(opts: { immediate?: boolean } = {}) {
  return useFetch<{ data: BookingView[] }>('/api/bookings', { key: 'my-bookings', immediate: opts.immediate ?? true })
}
export function useBooking(id: Ref<number>) {
  return useFetch<BookingView>(() => `/api/bookings/${id.value}`, { key: computed(() => `booking:${id.value}`) })
}
export function useTripBookings(id: Ref<number>) {
  return useFetch<{
    trip: { id: number; title: string; seats: number; seatsLeft: number; currency: string; status: string }
    data: Array<{ id: number; name: string; email: string; seats: number; status: string; holdExpiresAt: string | null; priceMinor: number; paidMinor: number; refundedMinor: number; dueMinor: number; balanceMinor: number; currency: string; createdAt: string }>
    waitlist: Array<{ id: number; position: number; name: string; email: string; seats: number; status: string; offerExpiresAt: string | null }>
  }>(() => `/api/trips/${id.value}/bookings`, { key: computed(() => `trip-bookings:${id.value}`) })
}
