import { IdParams } from '#shared/schemas/auth'
import { manifest } from '../../../../services/people/manifest'

/** The trip's manifest: organisers see every field; the trip's guides see no passport numbers or dates of birth; travellers 403. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  setResponseHeaders(event, { 'Cache-Control': 'no-store' })
  return withServiceErrors(() => manifest(useDb(), user, id))
})
