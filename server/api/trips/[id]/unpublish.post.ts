import { IdParams } from '#shared/schemas/auth'
import { unpublishTrip } from '../../../services/tripOps'

/** Back to draft (organisers): only a trip nobody has booked; otherwise 409 has_bookings (close sales instead). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => unpublishTrip(useDb(), user, id))
})
