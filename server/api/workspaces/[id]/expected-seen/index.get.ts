import { IdParams } from '#shared/schemas/auth'
import { expectedSeenSurface } from '../../../../services/bestGround'
import { assertWorkspaceAccess } from '../../../../services/planning'

/** The expected-seen surface of the workspace's eclipse as GeoJSON bands (cached per elements, ΔT and climatology). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const db = useDb()
  await withServiceErrors(() => assertWorkspaceAccess(db, user, id))
  await rateLimit(event, `surface:${user.id}`, 60, 60_000)
  return withServiceErrors(() => expectedSeenSurface(db, id))
})
