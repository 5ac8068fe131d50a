import { sendEmailConfirmation } from '../../services/accounts'
import { nowMs } from '../../services/clock'

/** A signed-in traveller whose address is not confirmed asks for a new link (at most one a minute). */
export default defineEventHandler(async (event) => {
  const user = await requireUser(event)
  if (user.email_confirmed_at) return { ok: true, alreadyConfirmed: true }
  const recent = await useDb().selectFrom('email_confirmations').select('expires_at').where('user_id', '=', user.id)
    .where('expires_at', '>', new Date(nowMs() + (48 * 60 - 1) * 60_000).toISOString()).executeTakeFirst()
  if (recent) throw createError({ statusCode: 429, statusMessage: 'Too soon', message: 'A link was sent less than a minute ago: check your inbox' })
  await useDb().transaction().execute((trx) => sendEmailConfirmation(trx, user, useRuntimeConfig(event).public.appUrl))
  return { ok: true }
})
