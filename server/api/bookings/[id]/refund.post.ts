import { IdParams } from '#shared/schemas/auth'
import { RefundCreate } from '#shared/schemas/trips'
import { manualRefund } from '../../../services/bookings'

export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { amountMinor, reason } = await readBodyAs(event, RefundCreate)
  return withServiceErrors(() => manualRefund(useDb(), useStripe(), user, id, amountMinor, reason, bookingConfig()))
})
