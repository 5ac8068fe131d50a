import { IdParams } from '#shared/schemas/auth'
import { isTripGuide, tripDetail, visibleTrip } from '../../../services/trips'

/** A published trip's public page data (organisers, and the trip's own guides, also see drafts). */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  const user = session.user ? await requireUser(event) : null
  const { id } = paramsAs(event, IdParams)
  const detail = await withServiceErrors(async () => tripDetail(useDb(), await visibleTrip(useDb(), user, id)))
  // The page shows an assigned guide their tools instead of the booking box.
  return { ...detail, viewer: { assignedGuide: user?.role === 'guide' ? await isTripGuide(useDb(), id, user.id) : false } }
})
