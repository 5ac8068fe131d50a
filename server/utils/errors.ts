import { EmailUnconfirmedError, HoldExistsError, SoldOutError, WaitlistExistsError } from '../services/bookings'
import { BookingStateError, CheckoutPendingError, RefundLimitError } from '../services/money'
import { UnknownEclipseError } from '../services/eclipses'
import { NotFoundError, SiteInUseError } from '../services/planning'
import { NotAssignedError, TripConflictError, TripRuleError } from '../services/trips'
import { NoTerrainError, SiteNameAutomaticError } from '../services/planningDetails'
import { CueRuleError } from '../services/timetable'
import { TotpError } from '../services/totp'
import { VoyageUnreachable } from '../services/sea/voyagePlan'
import { ForecastUnavailableError, TooEarlyError } from '../services/forecasts'
import { ParticipantRuleError } from '../services/people/participants'
import { ActiveBookingError, LastOrganiserEraseError } from '../services/personalData/erase'

/** The HTTP error for a service error, or null for anything unexpected (which stays a generic 500, no stack). */
export function httpErrorFor(e: unknown): Error | null {
  if (e instanceof UnknownEclipseError) return createError({ statusCode: 400, statusMessage: 'Unknown eclipse', message: e.message, data: { fields: { id: e.message } } })
  if (e instanceof TripRuleError) return createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { [e.field]: e.message } } })
  if (e instanceof NotAssignedError) return createError({ statusCode: 403, statusMessage: 'Not assigned', message: e.message, data: { code: 'not_assigned' } })
  if (e instanceof TripConflictError) return createError({ statusCode: 409, statusMessage: 'Conflict', message: e.message, data: { ...e.data, code: e.code } })
  if (e instanceof ParticipantRuleError) return createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: e.fields } })
  if (e instanceof CueRuleError) return createError({ statusCode: 400, statusMessage: 'Unsafe cue', message: e.message, data: { fields: e.fields } })
  if (e instanceof SiteInUseError) return createError({ statusCode: 409, statusMessage: 'Site in use', message: e.message, data: { code: 'site_in_use', trip: e.tripTitle } })
  if (e instanceof SiteNameAutomaticError) return createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { code: 'site_name_automatic', fields: { sites: e.message } } })
  if (e instanceof NoTerrainError) return createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { elevationM: e.message } } })
  if (e instanceof NotFoundError) return createError({ statusCode: 404, statusMessage: 'Not found', message: e.message })
  if (e instanceof SoldOutError) {
    return createError({ statusCode: 409, statusMessage: 'Sold out', message: e.message, data: { code: e.available === 0 ? 'sold_out' : 'not_enough_seats', available: e.available, waitlist: true } })
  }
  if (e instanceof HoldExistsError) return createError({ statusCode: 409, statusMessage: 'Hold exists', message: e.message, data: { code: 'hold_exists', bookingId: e.bookingId, seats: e.seats } })
  if (e instanceof WaitlistExistsError) return createError({ statusCode: 409, statusMessage: 'Already waiting', message: e.message, data: { code: 'waitlist_exists' } })
  if (e instanceof EmailUnconfirmedError) return createError({ statusCode: 403, statusMessage: 'E-mail not confirmed', message: e.message, data: { code: 'email_unconfirmed' } })
  if (e instanceof RefundLimitError) return createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { amountMinor: e.message } } })
  if (e instanceof TotpError) {
    return createError({ statusCode: e.statusCode, statusMessage: e.statusCode === 400 ? 'Invalid input' : e.statusCode === 429 ? 'Too many attempts' : 'Conflict', message: e.message, data: { code: e.code, ...(e.field ? { fields: { [e.field]: e.message } } : {}) } })
  }
  if (e instanceof CheckoutPendingError) return createError({ statusCode: 409, statusMessage: 'Checkout pending', message: e.message, data: { code: 'checkout_pending' } })
  if (e instanceof TooEarlyError) return createError({ statusCode: 409, statusMessage: 'Too early', message: e.message, data: { code: 'too_early', daysToWait: e.daysToWait, opensOn: e.opensOn } })
  if (e instanceof ForecastUnavailableError) return createError({ statusCode: 502, statusMessage: 'Forecast unavailable', message: e.message, data: { code: 'forecast_unavailable' } })
  if (e instanceof LastOrganiserEraseError) return createError({ statusCode: 409, statusMessage: 'Last organiser', message: e.message, data: { code: 'last_organiser' } })
  if (e instanceof ActiveBookingError) return createError({ statusCode: 409, statusMessage: 'Booking active', message: e.message, data: { code: 'booking_active', bookingIds: e.bookingIds } })
  if (e instanceof BookingStateError) return createError({ statusCode: 409, statusMessage: 'Conflict', message: e.message, data: { code: 'state' } })
  if (e instanceof VoyageUnreachable) return createError({ statusCode: 422, statusMessage: 'Unreachable', message: e.message, data: { code: 'unreachable', reason: e.reason } })
  return null
}

/** Runs a service call and maps its errors to HTTP: the one place where service errors meet status codes. */
export async function withServiceErrors<T>(fn: () => Promise<T> | T): Promise<T> {
  try {
    return await fn()
  } catch (e) {
    throw httpErrorFor(e) ?? e
  }
}
