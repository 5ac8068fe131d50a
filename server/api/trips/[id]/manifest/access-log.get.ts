import { IdParams } from '#shared/schemas/auth'
import { accessLog } from '../../../../services/people/manifest'

/** Who read passport numbers or medical notes on this trip, and when: organisers only. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => accessLog(useDb(), id))
})
