import { ParticipantBody, SeatParams } from '#shared/schemas/participants'
import { putParticipant } from '../../../../services/people/participants'

/**
 * A seat's participant details, replaced whole: the booking's traveller and organisers (anyone else
 * 404); a seat beyond the booking's count 404; a cancelled or expired booking 409; bad input 400 per field.
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id, seat } = paramsAs(event, SeatParams)
  const body = await readBodyAs(event, ParticipantBody)
  return withServiceErrors(() => putParticipant(useDb(), user, id, seat, body))
})
