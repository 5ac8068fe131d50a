import { IdParams } from '#shared/schemas/auth'
import { manifestXlsx } from '../../../services/people/manifest'

/** The manifest as an XLSX workbook: organisers only (logged as a read of passport numbers and medical notes). */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const xlsx = await withServiceErrors(() => manifestXlsx(useDb(), user, id))
  setResponseHeaders(event, {
    'Content-Type': 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    'Content-Disposition': `attachment; filename="umbrafield-trip-${id}-manifest.xlsx"`, 'Cache-Control': 'no-store',
  })
  return xlsx
})
