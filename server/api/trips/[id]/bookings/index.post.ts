import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { createHold, HoldExistsError, SoldOutError } from '../../../../services/bookings'
import { RateLimitedError } from '../../../../services/rateLimits'

/**
 * Holds seats. 409 with the code at the top level: 'sold_out' or 'not_enough_seats' when the seats
 * are not there, 'hold_exists' (with the booking) when the traveller already holds seats on the trip;
 * 403 'email_unconfirmed' until the address is confirmed. At most 10 hold requests per account in 10
 * minutes (429 with Retry-After; counted by the hold itself, see createHold).
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  const limit = { key: `hold:${user.id}`, limit: Number(process.env.UMBRAFIELD_HOLD_LIMIT || 10), windowMs: 10 * 60_000 }
  try {
    const hold = await createHold(useDb(), user, id, seats, bookingConfig(), limit)
    setResponseStatus(event, 201)
    return hold
  } catch (e) {
    if (e instanceof RateLimitedError) throw rateLimitedResponse(event, e)
    if (e instanceof HoldExistsError) {
      setResponseStatus(event, 409)
      return { statusCode: 409, code: 'hold_exists', message: e.message, bookingId: e.bookingId, seats: e.seats, data: { code: 'hold_exists', bookingId: e.bookingId, seats: e.seats } }
    }
    if (!(e instanceof SoldOutError)) throw httpErrorFor(e) ?? e
    setResponseStatus(event, 409)
    const code = e.available === 0 ? 'sold_out' : 'not_enough_seats'
    return { statusCode: 409, code, message: e.message, available: e.available, waitlist: true, data: { code, available: e.available, waitlist: true } }
  }
})
