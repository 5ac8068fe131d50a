import { IdParams } from '#shared/schemas/auth'
import { tripGuides } from '../../../services/tripOps'

/** Guide accounts and whether each is assigned to the trip (organisers, for the manage page). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => tripGuides(useDb(), id))
})
