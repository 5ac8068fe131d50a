import { IdParams } from '#shared/schemas/auth'
import { tripBookingsCsv } from '../../../services/tripAdmin'

export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const csv = await withServiceErrors(() => tripBookingsCsv(useDb(), id))
  setResponseHeaders(event, { 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="umbrafield-trip-${id}-bookings.csv"` })
  return csv
})
