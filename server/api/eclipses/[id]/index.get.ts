import { EclipseIdParams } from '#shared/schemas/elements'
import { eclipseDetail } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  // Public and computed (cached per element set): per address, like the path and local routes.
  await rateLimit(event, `detail:${clientIp(event)}`, Number(process.env.UMBRAFIELD_DETAIL_LIMIT || 600), 60_000)
  return withServiceErrors(() => eclipseDetail(useDb(), id))
})
