import { IdParams } from '#shared/schemas/auth'
import { BriefingQuery } from '#shared/schemas/trips'
import { assertBriefingAccess, briefing } from '../../../services/briefing'

/** The traveller's briefing for a site of the trip: booked travellers, the trip's guides, organisers; others 404. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { siteId } = queryAs(event, BriefingQuery)
  return withServiceErrors(async () => { await assertBriefingAccess(useDb(), user, id); return briefing(useDb(), id, siteId) })
})
