import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { createHold } from '../../../../services/bookings'

/** Holds seats; 409 { code: 'sold_out' } when none are left. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  const hold = await withBookingErrors(() => createHold(useDb(), user, id, seats, bookingConfig()))
  setResponseStatus(event, 201)
  return hold
})
