import type { BookingConfig } from '../services/bookings'

export function bookingConfig(): BookingConfig {
  const c = useRuntimeConfig()
  return { holdMinutes: Number(c.holdMinutes), offerHours: Number(c.offerHours), appUrl: c.public.appUrl }
}
