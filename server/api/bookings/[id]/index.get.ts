import { IdParams } from '#shared/schemas/auth'
import { bookingFor, bookingView } from '../../../services/bookings'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(async () => bookingView(useDb(), await bookingFor(useDb(), user, id)))
})
