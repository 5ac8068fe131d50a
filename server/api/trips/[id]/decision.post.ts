import { IdParams } from '#shared/schemas/auth'
import { DecisionBody } from '#shared/schemas/decisions'
import { decide } from '../../../services/decisions'

/** Records the day's decision (organisers): one of the trip's sites, departure, meeting point; tells everyone. 409 decision_locked after C1. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const body = await readBodyAs(event, DecisionBody)
  const r = await withDecisionErrors(() => decide(useDb(), user, id, body, useRuntimeConfig().public.appUrl, clientIp(event)))
  setResponseStatus(event, 201)
  return r
})
