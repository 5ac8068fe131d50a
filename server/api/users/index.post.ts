import { InviteBody } from '#shared/schemas/auth'
import { createUser, EmailTakenError, temporaryPassword } from '../../services/accounts'

/** Organiser invites a guide or organiser: the account is created with a one-time password shown once. */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'organiser')
  const body = await readBodyAs(event, InviteBody)
  const password = temporaryPassword()
  try {
    const user = await createUser(useDb(), { ...body, passwordHash: await hashPassword(password) }, actor.id, clientIp(event), 'invite')
    setResponseStatus(event, 201)
    return { user: toPublicUser(user), temporaryPassword: password }
  } catch (e) {
    if (e instanceof EmailTakenError) {
      throw createError({ statusCode: 409, statusMessage: 'Already registered', message: e.message, data: { fields: { email: e.message } } })
    }
    throw e
  }
})
