import { IdParams } from '#shared/schemas/auth'
import { tripBookings } from '../../../../services/tripAdmin'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => tripBookings(useDb(), id))
})
