import type { Ref } from 'vue'
import type { tripDetail } from '~~/server/services/trips'

/** The trip page's eclipse block, as the server builds it. */
export type TripEclipse = Awaited<ReturnType<typeof tripDetail>>['eclipse']

export interface TripView {
  id: number; title: string; description: string; status: 'draft' | 'published'; eclipseId: string; workspaceId: number
  startDate: string; endDate: string; seats: number; seatsLeft: number; priceMinor: number; depositMinor: number; currency: string
  balanceDueDate: string; cancellationTiers: Array<{ until: string; refundPct: number }>; minGroupSize: number
  meetingPoint: { name: string; lat: number; lon: number; timeUtc: string; local: string; utcOffset: string; zone: string }
  site: { id: number; name: string; lat: number; lon: number; elevationM: number }
  eclipse?: TripEclipse
}
export interface BookingView {
  id: number; tripId: number; trip: { id: number; title: string; eclipseId: string; startDate: string; balanceDueDate: string }
  seats: number; status: 'held' | 'confirmed' | 'cancelled' | 'expired'; holdExpiresAt: string | null
  priceMinor: number; depositMinor: number; paidMinor: number; refundedMinor: number; dueMinor: number; balanceMinor: number; currency: string
  refundPctToday: number; cancelReason: string | null
  receipts: Array<{ id: number; kind: string; amountMinor: number; currency: string; paidAt: string | null; reference: string | null; demo: boolean }>
  refunds: Array<{ id: number; amountMinor: number; status: string; reason: string; createdAt: string; reference: string | null }>
}

export function useTrips() {
  return useFetch<{ data: TripView[] }>('/api/trips', { key: 'trips' })
}
export function useTrip(id: Ref<number>) {
  return useFetch<TripView>(() => `/api/trips/${id.value}`, { key: computed(() => `trip:${id.value}`) })
}
export function useMyBookings() {
  return useFetch<{ data: BookingView[] }>('/api/bookings', { key: 'my-bookings' })
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
