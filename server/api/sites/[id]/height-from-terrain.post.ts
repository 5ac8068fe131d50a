import { IdParams } from '#shared/schemas/auth'
import { fillHeightFromTerrain } from '../../../services/planningDetails'

/** Organisers: set the site's height from the workspace's terrain model (400 naming elevationM when no model covers it). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => fillHeightFromTerrain(useDb(), user, id))
})
