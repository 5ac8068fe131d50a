import { AccountPatch } from '#shared/schemas/auth'
import { recordFailure, recordSuccess } from '../services/accounts'
import { audit } from '../services/audit'

export default defineEventHandler(async (event) => {
  const user = await requireUser(event, { totpSetup: true })
  const patch = await readBodyAs(event, AccountPatch)
  const db = useDb()
  const set: { name?: string; password_hash?: string; locale?: string } = {}
  if (patch.name) set.name = patch.name
  if (patch.locale) set.locale = patch.locale
  if (patch.newPassword) {
    // The current-password check is throttled like sign-in, keyed by the account.
    const key = `password:${user.id}`
    await beginAttemptOr429(event, db, key, clientIp(event))
    if (!(await verifyPassword(user.password_hash, patch.currentPassword ?? ''))) {
      await recordFailure(db, key, clientIp(event))
      throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'Current password is not right', data: { fields: { currentPassword: 'Current password is not right' } } })
    }
    await recordSuccess(db, user, clientIp(event), key)
    set.password_hash = await hashPassword(patch.newPassword)
  }
  if (Object.keys(set).length === 0) return toPublicUser(user)
  const updated = await db.transaction().execute(async (trx) => {
    // A new password ends every other session; this one continues under the new version.
    const u = await trx.updateTable('users').set(set)
      .$if(!!set.password_hash, (q) => q.set((eb) => ({ session_version: eb('session_version', '+', 1) })))
      .where('id', '=', user.id).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action: 'account_update', actorUserId: user.id, subjectUserId: user.id, ip: clientIp(event), detail: { fields: Object.keys(set) } })
    return u
  })
  if (set.password_hash) await startSession(event, updated)
  return toPublicUser(updated)
})
