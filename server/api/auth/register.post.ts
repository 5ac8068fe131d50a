import { RegisterBody } from '#shared/schemas/auth'
import { createUser, EmailTakenError } from '../../services/accounts'
import { accountExistsMail } from '../../services/mailTemplates'
import { enqueueMail } from '../../services/outbox'

/**
 * Sign-up answers the same whether or not the address already has an account, so nobody can learn
 * who is registered: 202 and "check your inbox". A new account gets its confirmation link; an
 * existing one's owner is told someone tried. Nobody is signed in here: the owner signs in next.
 */
export default defineEventHandler(async (event) => {
  const body = await readBodyAs(event, RegisterBody)
  await rateLimit(event, `sign-up:${clientIp(event)}`, Number(process.env.UMBRAFIELD_SIGNUP_LIMIT || 10), 3600_000)
  const appUrl = useRuntimeConfig(event).public.appUrl
  const passwordHash = await hashPassword(body.password)
  try {
    await createUser(useDb(), { name: body.name, email: body.email, passwordHash, role: 'traveller', locale: body.locale }, null, clientIp(event), 'sign_up', appUrl)
  } catch (e) {
    if (!(e instanceof EmailTakenError)) throw e
    const owner = await useDb().selectFrom('users').select(['name', 'email', 'locale']).where('email', '=', body.email).executeTakeFirstOrThrow()
    await enqueueMail(useDb(), { kind: 'account-exists', to: { email: owner.email, name: owner.name }, locale: owner.locale, ...accountExistsMail({ name: owner.name, signInUrl: `${appUrl}/login`, locale: owner.locale }) })
  }
  setResponseStatus(event, 202)
  return { ok: true, message: `Check your inbox at ${body.email}: follow the link there to confirm your address, then sign in.` }
})
