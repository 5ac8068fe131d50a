import { IdParams } from '#shared/schemas/auth'
import { RemindBody } from '#shared/schemas/participants'
import { remindBooking } from '../../../../services/people/participantReminders'

/** Organisers: e-mail a booking's traveller now about the participant details still missing (once a day per booking). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { bookingId } = await readBodyAs(event, RemindBody)
  const r = await withServiceErrors(() => remindBooking(useDb(), user, id, bookingId, useRuntimeConfig().public.appUrl))
  setResponseStatus(event, 202)
  return r
})
