import { TotpConfirmBody } from '#shared/schemas/totp'
import { confirmTotpSetup } from '../../../services/totp'

/** Turns two-factor on with a code from the app; answers the ten recovery codes, once. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  await rateLimit(event, `totp-confirm:${user.id}`, 10, 10 * 60_000)
  const { code } = await readBodyAs(event, TotpConfirmBody)
  const recoveryCodes = await withServiceErrors(() => confirmTotpSetup(useDb(), user, code, clientIp(event)))
  return { enabled: true, recoveryCodes }
})
