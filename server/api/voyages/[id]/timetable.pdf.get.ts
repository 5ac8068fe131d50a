import { z } from 'zod'
import { IdParams } from '#shared/schemas/auth'
import { getVoyage } from '../../../services/sea/voyages'
import { voyagePdf } from '../../../services/sea/voyagePdf'

const Query = z.object({ paper: z.enum(['a4', 'letter']).default('a4') })

/** A voyage's contact timetable as a PDF (organisers, and guides of its workspace's trips; others 404). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  const { paper } = queryAs(event, Query)
  const v = await withServiceErrors(() => getVoyage(useDb(), user, id))
  const pdf = await voyagePdf(v, paper)
  setResponseHeaders(event, { 'Content-Type': 'application/pdf', 'Content-Disposition': `attachment; filename="umbrafield-voyage-${id}.pdf"` })
  return pdf
})
