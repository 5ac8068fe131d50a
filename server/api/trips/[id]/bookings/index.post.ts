import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { createHold, SoldOutError } from '../../../../services/bookings'

/** Holds seats; 409 { code: 'sold_out' } (or 'not_enough_seats') when they are not there. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  try {
    const hold = await withPlanningErrors(() => createHold(useDb(), user, id, seats, bookingConfig()))
    setResponseStatus(event, 201)
    return hold
  } catch (e) {
    if (!(e instanceof SoldOutError)) throw e
    const sold = e
    const code = sold.available === 0 ? 'sold_out' : 'not_enough_seats'
    setResponseStatus(event, 409)
    return { statusCode: 409, code, message: sold.message, available: sold.available, waitlist: true, data: { code, available: sold.available, waitlist: true } }
  }
})
