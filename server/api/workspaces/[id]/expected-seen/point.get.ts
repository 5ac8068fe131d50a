import { IdParams } from '#shared/schemas/auth'
import { SurfacePointQuery } from '#shared/schemas/bestGround'
import { expectedSeenAt } from '../../../../services/bestGround'
import { assertWorkspaceAccess } from '../../../../services/planning'

/** The surface's figures at one point (the map's hover read-out). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const q = queryAs(event, SurfacePointQuery)
  const db = useDb()
  await withServiceErrors(() => assertWorkspaceAccess(db, user, id))
  await rateLimit(event, `surface-point:${user.id}`, 600, 60_000)
  return withServiceErrors(() => expectedSeenAt(db, id, q.lat, q.lon))
})
