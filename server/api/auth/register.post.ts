import { RegisterBody } from '#shared/schemas/auth'
import { createUser, EmailTakenError } from '../../services/accounts'

export default defineEventHandler(async (event) => {
  const body = await readBodyAs(event, RegisterBody)
  try {
    const user = await createUser(useDb(), {
      name: body.name, email: body.email, passwordHash: await hashPassword(body.password), role: 'traveller',
    }, null, clientIp(event), 'sign_up')
    await setUserSession(event, { user: { id: user.id, name: user.name, role: user.role }, loggedInAt: new Date().toISOString() })
    setResponseStatus(event, 201)
    return toPublicUser(user)
  } catch (e) {
    if (e instanceof EmailTakenError) {
      throw createError({ statusCode: 409, statusMessage: 'Already registered', message: e.message, data: { fields: { email: e.message } } })
    }
    throw e
  }
})
