import { IdParams } from '#shared/schemas/auth'
import { listVoyages } from '../../../../services/sea/voyages'

/** A workspace's voyages (organisers, and guides of the workspace's trips). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const data = await withServiceErrors(() => listVoyages(useDb(), user, id))
  return { data, meta: { total: data.length } }
})
