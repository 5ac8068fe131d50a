import { EclipseIdParams, PathQuery } from '#shared/schemas/elements'
import { eclipsePathFor } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  const q = queryAs(event, PathQuery)
  // Public and costly (a whole path is ~100 ms of CPU): per address, and ΔT overrides rounded to 0.1 s
  // so that a stream of made-up values cannot defeat the cache.
  await rateLimit(event, `path:${clientIp(event)}`, Number(process.env.UMBRAFIELD_PATH_LIMIT || 120), 60_000)
  if (q.deltaT !== undefined) q.deltaT = Math.round(q.deltaT * 10) / 10
  setResponseHeader(event, 'Cache-Control', 'private, max-age=300')
  return withServiceErrors(() => eclipsePathFor(useDb(), id, q))
})
