import { IdParams } from '#shared/schemas/auth'
import { itineraryPreview } from '../../../services/itinerary'

/** Preview of the itinerary e-mail and the number of recipients, before sending. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => itineraryPreview(useDb(), id, useRuntimeConfig().public.appUrl))
})
