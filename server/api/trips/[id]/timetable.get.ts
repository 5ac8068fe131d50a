import { IdParams } from '#shared/schemas/auth'
import { assertTimetableAccess, timetable } from '../../../services/timetable'

/** Contact timetable of every site of a trip: organisers and the trip's guides. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(async () => { await assertTimetableAccess(useDb(), user, id); return timetable(useDb(), id) })
})
