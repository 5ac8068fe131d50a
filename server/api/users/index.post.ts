import { InviteBody } from '#shared/schemas/auth'
import { createUser, EmailTakenError, unusablePasswordHash } from '../../services/accounts'

/**
 * Organiser invites a guide or organiser: the account is created with a password nobody knows, and
 * the invitee gets a link (seven days, once) to choose their own. No password is shown to anyone.
 */
export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'organiser')
  const body = await readBodyAs(event, InviteBody)
  try {
    const user = await createUser(useDb(), { ...body, passwordHash: await unusablePasswordHash(hashPassword) }, actor.id, clientIp(event), 'invite',
      useRuntimeConfig(event).public.appUrl, actor.name)
    setResponseStatus(event, 201)
    return { user: toPublicUser(user), message: `Invitation sent to ${user.email}: the link in it lets them choose a password within 7 days.` }
  } catch (e) {
    if (e instanceof EmailTakenError) {
      throw createError({ statusCode: 409, statusMessage: 'Already registered', message: e.message, data: { fields: { email: e.message } } })
    }
    throw e
  }
})
