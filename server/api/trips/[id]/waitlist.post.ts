import { IdParams } from '#shared/schemas/auth'
import { BookingCreate } from '#shared/schemas/trips'
import { joinWaitlist } from '../../../services/bookings'

/** Joins a trip's waitlist: 403 'email_unconfirmed' until the address is confirmed; at most 10 joins per account in 10 minutes. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  const { id } = paramsAs(event, IdParams)
  const { seats } = await readBodyAs(event, BookingCreate)
  // Each join writes a row and may later send mail: limited per account like holds.
  await rateLimit(event, `waitlist:${user.id}`, Number(process.env.UMBRAFIELD_WAITLIST_LIMIT || 10), 10 * 60_000)
  const w = await withServiceErrors(() => joinWaitlist(useDb(), user, id, seats, bookingConfig()))
  setResponseStatus(event, 201)
  return w
})
