import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { createHold, SoldOutError } from '../../../../services/bookings'

/** Holds seats; 409 { code: 'sold_out' } (or 'not_enough_seats') when they are not there, with the code at the top level. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  try {
    const hold = await createHold(useDb(), user, id, seats, bookingConfig())
    setResponseStatus(event, 201)
    return hold
  } catch (e) {
    if (!(e instanceof SoldOutError)) throw httpErrorFor(e) ?? e
    const code = e.available === 0 ? 'sold_out' : 'not_enough_seats'
    setResponseStatus(event, 409)
    return { statusCode: 409, code, message: e.message, available: e.available, waitlist: true, data: { code, available: e.available, waitlist: true } }
  }
})
