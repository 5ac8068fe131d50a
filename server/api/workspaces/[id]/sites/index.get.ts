import { IdParams } from '#shared/schemas/auth'
import { listSites } from '../../../../services/planning'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const data = await withServiceErrors(() => listSites(useDb(), id))
  return { data, meta: { total: data.length } }
})
