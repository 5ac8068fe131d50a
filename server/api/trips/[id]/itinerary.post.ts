import { z } from 'zod'
import { IdParams } from '#shared/schemas/auth'
import { sendItinerary } from '../../../services/itinerary'

const Body = z.object({ confirm: z.literal(true, { error: 'confirm must be true, after looking at the preview' }) })

/** Queues the itinerary for every confirmed participant. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  await readBodyAs(event, Body)
  return withServiceErrors(() => sendItinerary(useDb(), user, id, useRuntimeConfig().public.appUrl))
})
