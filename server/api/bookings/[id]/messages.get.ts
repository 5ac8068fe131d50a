import { IdParams } from '#shared/schemas/auth'
import { bookingMessages } from '../../../services/operations/messages'

/** The organisers' messages this booking received: its traveller and organisers; anyone else 404. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => bookingMessages(useDb(), user, id))
})
