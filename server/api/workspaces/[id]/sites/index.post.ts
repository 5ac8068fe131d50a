import { IdParams } from '#shared/schemas/auth'
import { SiteCreate } from '#shared/schemas/sites'
import { createSite, siteWithMetrics } from '../../../../services/planning'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const body = await readBodyAs(event, SiteCreate)
  const db = useDb()
  const site = await withServiceErrors(async () => siteWithMetrics(db, await createSite(db, user, id, body)))
  setResponseStatus(event, 201)
  return site
})
