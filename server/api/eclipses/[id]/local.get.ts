import { EclipseIdParams, LocalQuery } from '#shared/schemas/elements'
import { eclipseLocalFor } from '../../../services/eclipses'

export default defineEventHandler(async (event) => {
  const { id } = paramsAs(event, EclipseIdParams)
  const q = queryAs(event, LocalQuery)
  return withServiceErrors(() => eclipseLocalFor(useDb(), id, { latDeg: q.lat, lonDeg: q.lon, elevationM: q.elev ?? 0 }, q.deltaT))
})
