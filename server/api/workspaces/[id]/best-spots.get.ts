import { IdParams } from '#shared/schemas/auth'
import { BestSpotsQuery } from '#shared/schemas/bestGround'
import { bestSpots } from '../../../services/bestGround'
import { assertWorkspaceAccess } from '../../../services/planning'

/** The best ground near a point: spots ranked by expected seen seconds, on land, at least minSeparationKm apart (default 25 km). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const q = queryAs(event, BestSpotsQuery)
  const db = useDb()
  await withServiceErrors(() => assertWorkspaceAccess(db, user, id))
  await rateLimit(event, `best-spots:${user.id}`, 60, 60_000)
  return withServiceErrors(() => bestSpots(db, id, q))
})
