import { IdParams } from '#shared/schemas/auth'
import { getVoyage } from '../../../services/sea/voyages'

/** One voyage as planned (organisers, and guides of its workspace's trips). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => getVoyage(useDb(), user, id))
})
