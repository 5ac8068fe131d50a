import { z } from 'zod'
import { requestLocale } from '../../../../../utils/requestLocale'
import { siteTimetableIcs } from '../../../../../services/calendar'
import { assertTimetableAccess, timetable } from '../../../../../services/timetable'

const Params = z.object({ id: z.coerce.number().int().positive(), siteId: z.coerce.number().int().positive() })

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id, siteId } = paramsAs(event, Params)
  const t = await withServiceErrors(async () => { await assertTimetableAccess(useDb(), user, id); return timetable(useDb(), id) })
  const site = t.sites.find((s) => s.siteId === siteId)
  if (!site) throw createError({ statusCode: 404, statusMessage: 'No such site on this trip' })
  setResponseHeaders(event, { 'Content-Type': 'text/calendar; charset=utf-8', 'Content-Disposition': `attachment; filename="umbrafield-${t.trip.eclipseId}-site-${siteId}.ics"` })
  return siteTimetableIcs(t.trip, site, t.decision?.siteId === siteId ? t.decision : null, requestLocale(event, user))
})
