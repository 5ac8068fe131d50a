import { PasswordResetBody } from '#shared/schemas/auth'
import { requestPasswordReset } from '../../../services/accounts'

const RESET_ANSWER = { ok: true, message: 'If an account uses this address, a link to choose a new password is on its way. It works once, for one hour.' }

/**
 * "Forgot your password": always 202 with the same body, whether or not the address has an account
 * (the service does the same work either way). Limited per address and per client address.
 */
export default defineEventHandler(async (event) => {
  const { email } = await readBodyAs(event, PasswordResetBody)
  const ip = clientIp(event)
  await rateLimit(event, `password-reset ip:${ip}`, Number(process.env.UMBRAFIELD_RESET_LIMIT_IP || 20), 3600_000)
  await rateLimit(event, `password-reset email:${email}`, Number(process.env.UMBRAFIELD_RESET_LIMIT_EMAIL || 5), 3600_000)
  await requestPasswordReset(useDb(), email, useRuntimeConfig(event).public.appUrl, ip)
  setResponseStatus(event, 202)
  return RESET_ANSWER
})
