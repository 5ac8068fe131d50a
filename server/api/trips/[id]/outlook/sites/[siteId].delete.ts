import { OutlookSiteParams } from '#shared/schemas/outlook'
import { removeOutlookSite } from '../../../../../services/forecasts'

/** Takes an added site off the trip's outlook, or clears an entered drive time (organisers; idempotent). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id, siteId } = paramsAs(event, OutlookSiteParams)
  return withServiceErrors(() => removeOutlookSite(useDb(), user, id, siteId))
})
