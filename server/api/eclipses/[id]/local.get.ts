import { EclipseIdParams, LocalQuery } from '#shared/schemas/elements'
import { eclipseLocalFor } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  const q = queryAs(event, LocalQuery)
  await rateLimit(event, `local:${clientIp(event)}`, Number(process.env.UMBRAFIELD_LOCAL_LIMIT || 600), 60_000)
  if (q.deltaT !== undefined) q.deltaT = Math.round(q.deltaT * 10) / 10
  return withServiceErrors(() => eclipseLocalFor(useDb(), id, { latDeg: q.lat, lonDeg: q.lon, elevationM: q.elev ?? 0 }, q.deltaT))
})
