import { IdParams } from '#shared/schemas/auth'
import { SitePatch } from '#shared/schemas/sites'
import { ConfirmQuery } from '#shared/schemas/tripOps'
import { siteWithMetrics } from '../../services/planning'
import { changeSite } from '../../services/tripOps'

/** Renaming or moving a site that a booked trip uses: 409 confirm_needed (trips, travellers) until `?confirm=true`. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { confirm } = queryAs(event, ConfirmQuery)
  const patch = await readBodyAs(event, SitePatch)
  const db = useDb()
  await withServiceErrors(() => changeSite(db, user, id, patch, confirm, useRuntimeConfig().public.appUrl))
  return withServiceErrors(() => siteWithMetrics(db, id))
})
