import { IdParams } from '#shared/schemas/auth'
import { TripMessageCreate } from '#shared/schemas/operations'
import { sendTripMessage } from '../../../../services/operations/messages'

/**
 * Sends an organiser's message to the trip's group ('confirmed' bookings, or 'all' active ones)
 * through the outbox: 202 { queued } (mails are sent by the worker). At most 20 per organiser an hour.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const message = await readBodyAs(event, TripMessageCreate)
  await rateLimit(event, `trip-message:${user.id}`, Number(process.env.UMBRAFIELD_MESSAGE_LIMIT || 20), 3600_000)
  const r = await withServiceErrors(() => sendTripMessage(useDb(), user, id, message, useRuntimeConfig().public.appUrl))
  setResponseStatus(event, 202)
  return r
})
