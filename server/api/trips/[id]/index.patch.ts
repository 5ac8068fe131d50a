import { IdParams } from '#shared/schemas/auth'
import { TripPatch } from '#shared/schemas/tripOps'
import { updateTrip } from '../../../services/tripOps'

/**
 * Edits a trip (organisers): any of its fields, sales open or closed. 400 naming the field when a
 * rule breaks (seats below those held and sold names the count). Every change is audited; travellers
 * holding seats are e-mailed new dates, meeting point or sites. Bookings keep their agreed amounts.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const patch = await readBodyAs(event, TripPatch)
  return withServiceErrors(() => updateTrip(useDb(), user, id, patch, bookingConfig()))
})
