import { IdParams } from '#shared/schemas/auth'
import { publishTrip } from '../../../services/trips'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => publishTrip(useDb(), user, id))
})
