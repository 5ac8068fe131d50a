import { IdParams } from '#shared/schemas/auth'
import { participants } from '../../../services/tripAdmin'

/** Who is coming: organisers and the trip's guides. Names and seats only, no payments. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => participants(useDb(), user, id))
})
