import { RegisterBody } from '#shared/schemas/auth'
import { createUser, EmailTakenError } from '../../services/accounts'

export default defineEventHandler(async (event) => {
  const body = await readBodyAs(event, RegisterBody)
  rateLimit(event, `sign-up:${clientIp(event)}`, Number(process.env.UMBRAFIELD_SIGNUP_LIMIT || 10), 3600_000)
  try {
    const user = await createUser(useDb(), {
      name: body.name, email: body.email, passwordHash: await hashPassword(body.password), role: 'traveller',
    }, null, clientIp(event), 'sign_up', useRuntimeConfig(event).public.appUrl)
    await startSession(event, user)
    setResponseStatus(event, 201)
    return toPublicUser(user)
  } catch (e) {
    if (e instanceof EmailTakenError) {
      throw createError({ statusCode: 409, statusMessage: 'Already registered', message: e.message, data: { fields: { email: e.message } } })
    }
    throw e
  }
})
