import { IdParams } from '#shared/schemas/auth'
import { TripGuidesPut } from '#shared/schemas/tripOps'
import { setTripGuides } from '../../../services/tripOps'

/** Sets the trip's guides to exactly `userIds` (organisers); 400 naming an account that is not a guide. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { userIds } = await readBodyAs(event, TripGuidesPut)
  return withServiceErrors(() => setTripGuides(useDb(), user, id, userIds))
})
