import { IdParams } from '#shared/schemas/auth'
import { BookingSearch } from '#shared/schemas/operations'
import { searchTripBookings } from '../../../../services/operations/bookingSearch'

/** The organiser's bookings of a trip, filtered by ?q= (name or e-mail), &status= and &owing=true|false. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const filters = queryAs(event, BookingSearch)
  return withServiceErrors(() => searchTripBookings(useDb(), id, filters))
})
