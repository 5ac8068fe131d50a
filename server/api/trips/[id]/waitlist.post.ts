import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { joinWaitlist } from '../../../services/bookings'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  const w = await withServiceErrors(() => joinWaitlist(useDb(), user, id, seats, bookingConfig()))
  setResponseStatus(event, 201)
  return w
})
