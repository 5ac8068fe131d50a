import { IdParams } from '#shared/schemas/auth'
import { listSites } from '../../../../services/planning'
import { cloudLookupFor } from '../../../../services/climatology'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const data = await withPlanningErrors(() => listSites(useDb(), id, (ws) => cloudLookupFor(useDb(), ws)))
  return { data, meta: { total: data.length } }
})
