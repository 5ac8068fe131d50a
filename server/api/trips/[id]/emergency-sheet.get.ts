import { IdParams } from '#shared/schemas/auth'
import { emergencySheet } from '../../../services/people/manifest'

/** The guide's emergency sheet for the countdown: names, medical and mobility notes, emergency contacts. Organisers and the trip's guides. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  setResponseHeaders(event, { 'Cache-Control': 'no-store' })
  return withServiceErrors(() => emergencySheet(useDb(), user, id))
})
