import { IdParams } from '#shared/schemas/auth'
import { tripDetail, visibleTrip } from '../../../services/trips'

/** A published trip's public page data (organisers also see drafts). */
export default defineEventHandler(async (event) => {
  const session = await getUserSession(event)
  const user = session.user ? await requireUser(event) : null
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(async () => tripDetail(useDb(), await visibleTrip(useDb(), user, id)))
})
