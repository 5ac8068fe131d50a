import { IdParams, RolePatch } from '#shared/schemas/auth'
import { changeRole, LastOrganiserError, NotOrganiserError } from '../../services/accounts'

export default defineEventHandler(async (event) => {
  const actor = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, IdParams)
  const { role } = await readBodyAs(event, RolePatch)
  try {
    const user = await changeRole(useDb(), actor, id, role, clientIp(event))
    if (!user) throw createError({ statusCode: 404, statusMessage: 'No such user' })
    return toPublicUser(user)
  } catch (e) {
    if (e instanceof LastOrganiserError) throw createError({ statusCode: 409, statusMessage: 'Conflict', message: e.message })
    if (e instanceof NotOrganiserError) throw createError({ statusCode: 403, statusMessage: 'Not allowed for your role', message: e.message })
    throw e
  }
})
