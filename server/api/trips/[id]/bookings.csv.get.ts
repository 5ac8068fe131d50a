import { IdParams } from '#shared/schemas/auth'
import { BookingSearch } from '#shared/schemas/operations'
import { searchTripBookingsCsv } from '../../../services/operations/bookingSearch'

/** The bookings as CSV (amounts in major units, currency column), with the table's filters. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const filters = queryAs(event, BookingSearch)
  const csv = await withServiceErrors(() => searchTripBookingsCsv(useDb(), id, filters))
  setResponseHeaders(event, { 'Content-Type': 'text/csv; charset=utf-8', 'Content-Disposition': `attachment; filename="umbrafield-trip-${id}-bookings.csv"` })
  return csv
})
