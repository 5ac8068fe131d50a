import { TotpDisableBody } from '#shared/schemas/totp'
import { recordFailure, recordSuccess } from '../../../services/accounts'
import { assertMayDisable, disableTotp } from '../../../services/totp'

/** Turns two-factor off: needs the password and a current code (or a recovery code). */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  const { password, totp } = await readBodyAs(event, TotpDisableBody)
  const db = useDb()
  const ip = clientIp(event)
  await withServiceErrors(() => assertMayDisable(db, user))
  // Throttled like the current-password check when changing the password (same key).
  const key = `password:${user.id}`
  await beginAttemptOr429(event, db, key, ip)
  if (!(await verifyPassword(user.password_hash, password))) {
    await recordFailure(db, key, ip)
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Password is not right', data: { fields: { password: 'Password is not right' } } })
  }
  if (!(await secondFactorOr429(event, db, user, totp, ip))) {
    await recordFailure(db, key, ip)
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'That code is not right', data: { code: 'totp_invalid', fields: { totp: 'That code is not right' } } })
  }
  await recordSuccess(db, user, ip, key)
  await disableTotp(db, user, ip)
  return { enabled: false }
})
