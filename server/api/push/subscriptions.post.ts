import { PushSubscriptionBody } from '#shared/schemas/decisions'
import { savePushSubscription } from '../../services/decisionSend'

/** Keeps this device's push subscription for the signed-in user (opted in on the countdown page). */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const body = await readBodyAs(event, PushSubscriptionBody)
  const r = await withDecisionErrors(() => savePushSubscription(useDb(), user.id, body))
  setResponseStatus(event, 201)
  return r
})
