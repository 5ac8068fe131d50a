import { IdParams } from '#shared/schemas/auth'
import { SitePatch } from '#shared/schemas/sites'
import { siteWithMetrics, updateSite } from '../../services/planning'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const patch = await readBodyAs(event, SitePatch)
  const db = useDb()
  await withServiceErrors(() => updateSite(db, id, patch))
  return withServiceErrors(() => siteWithMetrics(db, id))
})
