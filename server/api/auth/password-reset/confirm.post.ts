import { PasswordResetConfirmBody } from '#shared/schemas/auth'
import { InvalidTokenError, passwordLinkUsable, resetPassword } from '../../../services/accounts'

const invalid = (message: string) => createError({ statusCode: 400, statusMessage: 'Invalid link', message, data: { code: 'token_invalid', fields: { token: message } } })

/**
 * A reset or invitation link's page posts its token and the new password here. The link works
 * once; the new password ends every session of the account. Nobody is signed in here.
 */
export default defineEventHandler(async (event) => {
  const { token, password } = await readBodyAs(event, PasswordResetConfirmBody)
  const db = useDb()
  // A dead link costs a lookup, not a password hash.
  if (!(await passwordLinkUsable(db, token))) throw invalid('This link is not valid any more: ask for a new one')
  try {
    await resetPassword(db, token, await hashPassword(password), clientIp(event))
  } catch (e) {
    if (e instanceof InvalidTokenError) throw invalid(e.message)
    throw e
  }
  return { ok: true }
})
