import type { BookingConfig } from '../services/bookings'
import { BookingStateError, SoldOutError } from '../services/bookings'
import { TripRuleError } from '../services/trips'

export function bookingConfig(): BookingConfig {
  const c = useRuntimeConfig()
  return { holdMinutes: Number(c.holdMinutes), offerHours: Number(c.offerHours), appUrl: c.public.appUrl }
}

/** Maps booking and trip rule errors to HTTP; 404s via withPlanningErrors. */
export async function withBookingErrors<T>(fn: () => Promise<T>): Promise<T> {
  try {
    return await withPlanningErrors(fn)
  } catch (e) {
    if (e instanceof SoldOutError) {
      throw createError({ statusCode: 409, statusMessage: 'Sold out', message: e.message, data: { code: e.available === 0 ? 'sold_out' : 'not_enough_seats', available: e.available, waitlist: true } })
    }
    if (e instanceof BookingStateError) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: e.message, data: { code: 'state' } })
    if (e instanceof TripRuleError) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { [e.field]: e.message } } })
    throw e
  }
}
