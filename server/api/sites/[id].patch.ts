import { IdParams } from '#shared/schemas/auth'
import { SitePatch } from '#shared/schemas/sites'
import { siteWithMetrics, updateSite } from '../../services/planning'
import { cloudLookupFor } from '../../services/climatology'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const patch = await readBodyAs(event, SitePatch)
  const db = useDb()
  await withPlanningErrors(() => updateSite(db, id, patch))
  return withPlanningErrors(() => siteWithMetrics(db, id, (ws) => cloudLookupFor(db, ws)))
})
