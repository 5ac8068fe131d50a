import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { changeHoldSeats } from '../../services/bookings'

/** The traveller changes the seat count of their active hold (instead of holding twice). */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  return withServiceErrors(() => changeHoldSeats(useDb(), useRuntimeConfig().stripe.secretKey ? useStripe() : null, user, id, seats, bookingConfig()))
})
