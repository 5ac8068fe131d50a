import { IdParams } from '#shared/schemas/auth'
import { ConfirmQuery } from '#shared/schemas/tripOps'
import { removeSite } from '../../services/tripOps'

/** A trip's primary site cannot be deleted (409 site_in_use); a fallback of a booked trip asks first (409 confirm_needed) until `?confirm=true`. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { confirm } = queryAs(event, ConfirmQuery)
  await withServiceErrors(() => removeSite(useDb(), user, id, confirm, useRuntimeConfig().public.appUrl))
  return { ok: true }
})
