import { IdParams } from '#shared/schemas/auth'
import { cancelBooking } from '../../../services/bookings'

/** Cancels one's own booking (organisers: any); the refund follows the trip's tiers. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => cancelBooking(useDb(), useRuntimeConfig().stripe.secretKey ? useStripe() : null, user, id, bookingConfig()))
})
