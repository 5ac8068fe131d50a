import { totpStatus } from '../../../services/totp'

/** The caller's two-factor state: on or off, recovery codes left, whether the staff rule requires it. */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  return totpStatus(useDb(), user)
})
