import { IdParams } from '#shared/schemas/auth'
import { listParticipants } from '../../../../services/people/participants'

/** One participant per booked seat (seat 1 the holder), filled or not: the booking's traveller and organisers. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  setResponseHeaders(event, { 'Cache-Control': 'no-store' })
  return withServiceErrors(() => listParticipants(useDb(), user, id))
})
