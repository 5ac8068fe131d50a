import { z } from 'zod'
import { requestLocale } from '../../../utils/requestLocale'
import { IdParams } from '#shared/schemas/auth'
import { briefing } from '../../../services/briefing'
import { assertTimetableAccess, timetable } from '../../../services/timetable'
import { timetablePdf } from '../../../services/timetablePdf'
import { roomingList } from '../../../services/people/manifest'

const Query = z.object({ paper: z.enum(['a4', 'letter']).default('a4') })

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const { paper } = queryAs(event, Query)
  // Headings, cues, safety and numbers in the requester's language (account, language cookie, Accept-Language).
  const locale = requestLocale(event, user)
  const t = await withServiceErrors(async () => { await assertTimetableAccess(useDb(), user, id); return timetable(useDb(), id, locale) })
  // Each site's page is followed by the participants' briefing for it, to print with the timetable.
  const briefings = await withServiceErrors(() => Promise.all(t.sites.map((s) => briefing(useDb(), id, s.siteId, t))))
  // Organisers' pack ends with the rooming list (guides do not get travellers' room details).
  const rooming = user.role === 'organiser' ? await roomingList(useDb(), id) : undefined
  const pdf = await timetablePdf(t, paper, briefings, rooming, locale)
  setResponseHeaders(event, { 'Content-Type': 'application/pdf', 'Content-Disposition': `attachment; filename="umbrafield-timetable-trip-${id}.pdf"` })
  return pdf
})
