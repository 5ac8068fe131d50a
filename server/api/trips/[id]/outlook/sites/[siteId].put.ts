import { OutlookSiteBody, OutlookSiteParams } from '#shared/schemas/outlook'
import { setOutlookSite } from '../../../../../services/forecasts'

/**
 * Adds a site of the trip's workspace to its outlook, or sets the drive time from the meeting point
 * for any outlook site (organisers). `{ driveMinutes: null }` uses the estimate from the distance.
 */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id, siteId } = paramsAs(event, OutlookSiteParams)
  const body = await readBodyAs(event, OutlookSiteBody)
  return withServiceErrors(() => setOutlookSite(useDb(), user, id, siteId, body))
})
