import { VerifyEmailBody } from '#shared/schemas/auth'
import { confirmEmail, InvalidTokenError } from '../../services/accounts'

/** The confirmation link's page posts its token here; the address is confirmed once. */
export default defineEventHandler(async (event) => {
  const { token } = await readBodyAs(event, VerifyEmailBody)
  try {
    const user = await confirmEmail(useDb(), token)
    return { ok: true, user: toPublicUser(user) }
  } catch (e) {
    if (e instanceof InvalidTokenError) throw createError({ statusCode: 400, statusMessage: 'Invalid link', message: e.message, data: { fields: { token: e.message } } })
    throw e
  }
})
