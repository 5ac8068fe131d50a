import { totpStatus } from '../services/totp'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  const totp = await totpStatus(useDb(), user)
  return { ...toPublicUser(user), twoFactor: { enabled: totp.enabled, setupRequired: totp.setupRequired } }
})
