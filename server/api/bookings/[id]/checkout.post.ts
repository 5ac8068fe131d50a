import { IdParams } from '#shared/schemas/auth'
import { startCheckout } from '../../../services/money'

/** Starts Stripe Checkout for what is due now (deposit, then balance); returns the hosted page URL. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  return withServiceErrors(() => startCheckout(useDb(), useStripe(), user, id, bookingConfig()))
})
