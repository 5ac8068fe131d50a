import { EraseBody } from '#shared/schemas/personalData'
import { recordFailure, recordSuccess } from '../../services/accounts'
import { erasePersonalData } from '../../services/personalData/erase'

/**
 * Erases the caller's personal data (password needed; see the service for what goes and what stays).
 * 400 naming `password` when it is wrong (nothing changes); 409 `last_organiser`, `booking_active`.
 */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  const { password } = await readBodyAs(event, EraseBody)
  const db = useDb()
  const ip = clientIp(event)
  // Throttled like the other current-password checks (same key).
  const key = `password:${user.id}`
  await beginAttemptOr429(event, db, key, ip)
  if (!(await verifyPassword(user.password_hash, password))) {
    await recordFailure(db, key, ip)
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Password is not right', data: { fields: { password: 'Password is not right' } } })
  }
  await recordSuccess(db, user, ip, key)
  const stripe = useRuntimeConfig().stripe.secretKey ? useStripe() : null
  const result = await withServiceErrors(() => erasePersonalData(db, stripe, user, bookingConfig(), hashPassword))
  await clearUserSession(event)
  return { erased: true, ...result }
})
