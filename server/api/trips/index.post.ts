import { TripCreate } from '#shared/schemas/trips'
import { createTrip } from '../../services/trips'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const body = await readBodyAs(event, TripCreate)
  const trip = await withServiceErrors(() => createTrip(useDb(), user, body))
  setResponseStatus(event, 201)
  return trip
})
