import { IdParams } from '#shared/schemas/auth'
import { resendUnacknowledged } from '../../../../services/decisions'

/** Sends the decision in force again, only to those who have not acknowledged it (organisers). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withDecisionErrors(() => resendUnacknowledged(useDb(), user, id, useRuntimeConfig().public.appUrl, clientIp(event)))
})
