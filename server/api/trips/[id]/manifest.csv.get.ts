import { IdParams } from '#shared/schemas/auth'
import { manifestCsv } from '../../../services/people/manifest'

/** The manifest as spreadsheet-safe CSV: organisers only (logged as a read of passport numbers and medical notes). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const csv = await withServiceErrors(() => manifestCsv(useDb(), user, id))
  setResponseHeaders(event, { 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="umbrafield-trip-${id}-manifest.csv"`, 'Cache-Control': 'no-store' })
  return csv
})
