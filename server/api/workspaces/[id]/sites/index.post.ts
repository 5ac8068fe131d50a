import { IdParams } from '#shared/schemas/auth'
import { SiteCreate } from '#shared/schemas/sites'
import { createSite, siteWithMetrics } from '../../../../services/planning'
import { cloudLookupFor } from '../../../../services/climatology'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const body = await readBodyAs(event, SiteCreate)
  const db = useDb()
  const site = await withPlanningErrors(async () => siteWithMetrics(db, await createSite(db, user, id, body), (ws) => cloudLookupFor(db, ws)))
  setResponseStatus(event, 201)
  return site
})
