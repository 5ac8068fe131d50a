import { LoginBody } from '#shared/schemas/auth'
import { recordFailure, recordSuccess } from '../../services/accounts'
import { totpEnabled } from '../../services/totp'

const GENERIC = 'E-mail or password is not right'

/** A hash to check when the e-mail is unknown, so that unknown and known addresses take as long. */
let dummy: Promise<string> | undefined
const dummyHash = () => (dummy ??= hashPassword('no such account: the answer must take as long'))

export default defineEventHandler(async (event) => {
  const { email, password, totp } = await readBodyAs(event, LoginBody)
  const db = useDb()
  const ip = clientIp(event)
  await beginAttemptOr429(event, db, email, ip)
  const user = await db.selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst()
  const ok = user ? await verifyPassword(user.password_hash, password) : (await verifyPassword(await dummyHash(), password), false)
  if (!user || !ok) {
    await recordFailure(db, email, ip)
    throw createError({ statusCode: 401, statusMessage: 'Sign-in failed', message: GENERIC })
  }
  // Two-factor, asked only once the password is right. This attempt stays recorded until a full
  // sign-in succeeds, so wrong codes (and code-less tries) count towards the same backoff.
  if (await totpEnabled(db, user.id)) {
    if (!totp) {
      throw createError({ statusCode: 401, statusMessage: 'Code needed', message: 'Enter the 6-digit code from your authenticator app, or a recovery code.', data: { code: 'totp_required' } })
    }
    if (!(await secondFactorOr429(event, db, user, totp, ip))) {
      await recordFailure(db, email, ip)
      throw createError({ statusCode: 401, statusMessage: 'Sign-in failed', message: 'That code is not right, or it was already used.', data: { code: 'totp_invalid' } })
    }
  }
  await recordSuccess(db, user, ip)
  await startSession(event, user)
  return toPublicUser(user)
})
