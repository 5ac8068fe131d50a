import { IdParams } from '#shared/schemas/auth'
import { VoyageCreate } from '#shared/schemas/voyages'
import { createVoyage } from '../../../../services/sea/voyages'

/**
 * Plans a voyage that intercepts the central path at sea (organisers): 201 with the intercept, the
 * water route, departBy and alternatives; 422 with data.code 'unreachable' and the reason when no sea
 * point of the path can be reached in time with the Sun high enough.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const body = await readBodyAs(event, VoyageCreate)
  await rateLimit(event, `voyage:${user.id}`, 30, 60_000)
  const voyage = await withServiceErrors(() => createVoyage(useDb(), user, id, body))
  setResponseStatus(event, 201)
  return voyage
})
