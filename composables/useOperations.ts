import type { Ref } from 'vue'
import type { listAlerts } from '~~/server/services/operations/alerts'
import type { bookingMessages, tripMessages } from '~~/server/services/operations/messages'
import type { searchTripBookings } from '~~/server/services/operations/bookingSearch'

/** Filters of a trip's bookings table (and its CSV): '' is no filter. */
export interface BookingFilters { q: string; status: '' | 'held' | 'confirmed' | 'cancelled' | 'expired'; owing: '' | 'true' | 'false' }

/** The query string of the filters that are set, for the table's request and the CSV link. */
export function bookingFilterQuery(f: BookingFilters): Record<string, string> {
  return Object.fromEntries(Object.entries(f).filter(([, v]) => v !== ''))
}

export function useTripBookingSearch(id: Ref<number>, filters: Ref<BookingFilters>) {
  return useFetch<Awaited<ReturnType<typeof searchTripBookings>>>(() => `/api/trips/${id.value}/bookings`, {
    // One key per trip: a filter change refetches (the query is watched) and keeps the table shown meanwhile.
    key: computed(() => `trip-bookings-search:${id.value}`),
    query: computed(() => bookingFilterQuery(filters.value)),
  })
}

export function useTripMessages(id: Ref<number>) {
  return useFetch<Awaited<ReturnType<typeof tripMessages>>>(() => `/api/trips/${id.value}/messages`, { key: computed(() => `trip-messages:${id.value}`) })
}

export function useBookingMessages(id: Ref<number>) {
  return useFetch<Awaited<ReturnType<typeof bookingMessages>>>(() => `/api/bookings/${id.value}/messages`, { key: computed(() => `booking-messages:${id.value}`) })
}

export function useAlerts() {
  return useFetch<Awaited<ReturnType<typeof listAlerts>>>('/api/alerts', { key: 'alerts' })
}
