import { IdParams } from '#shared/schemas/auth'
import { outlook } from '../../../../services/forecasts'

/**
 * The forecast outlook of a trip (organisers and the trip's guides; anyone else 404): per site the
 * latest cloud forecast at maximum, its trend, climatology, duration, Sun, terrain, drive time,
 * expected seen seconds and rank, and a recommendation. More than seven days before the eclipse: 409
 * `too_early` with the days to wait.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => outlook(useDb(), user, id))
})
