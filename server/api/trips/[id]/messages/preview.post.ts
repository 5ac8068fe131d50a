import { IdParams } from '#shared/schemas/auth'
import { TripMessageCreate } from '#shared/schemas/operations'
import { previewTripMessage } from '../../../../services/operations/messages'

/** What a message to the group would look like and whom it would reach; nothing is sent. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const message = await readBodyAs(event, TripMessageCreate)
  return withServiceErrors(() => previewTripMessage(useDb(), user, id, message, useRuntimeConfig().public.appUrl))
})
