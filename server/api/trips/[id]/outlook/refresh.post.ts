import { IdParams } from '#shared/schemas/auth'
import { refreshOutlook } from '../../../../services/forecasts'

/**
 * Fetches the trip's cloud forecast now and keeps it as a new run (organisers). 409 `too_early` more
 * than seven days before the eclipse; 502 `forecast_unavailable` when the forecast service fails.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => refreshOutlook(useDb(), useRuntimeConfig().forecastApiUrl, user, id))
})
