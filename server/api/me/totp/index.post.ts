import { startTotpSetup } from '../../../services/totp'

/** Offers a new TOTP secret (pending until confirmed with a code): the secret, its otpauth URI and a QR code. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  await rateLimit(event, `totp-setup:${user.id}`, 10, 10 * 60_000)
  return withServiceErrors(() => startTotpSetup(useDb(), user))
})
