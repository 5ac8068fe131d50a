import { createHash, randomBytes } from 'node:crypto'
import { sql, type Kysely, type Transaction } from 'kysely'
import { isPostgres } from '../database/dialect'
import type { Database, Role, User } from '../database/schema'
import { audit } from './audit'
import { confirmEmailMail } from './mailTemplates'
import { enqueueMail } from './outbox'
import { nowIso, nowMs } from './clock'

/**
 * Sign-in throttling by account and by address, with backoff rather than a lock: after the free
 * failures inside the window, each further try must wait 2, 4, 8 … seconds (at most 15 minutes)
 * after the last failure. The attempt is recorded before the password is checked, in the same
 * transaction as the check, so concurrent guesses queue behind each other instead of all passing.
 * A success clears the account's record. The same mechanism guards the current-password check.
 */
export const THROTTLE = { windowMin: 15, freeByKey: 5, freeByIp: 30, maxDelaySec: 900 }

export class ThrottledError extends Error {
  constructor(public retryAfterSec: number) { super('Too many failed attempts') }
}

const delaySec = (failures: number, free: number) => (failures < free ? 0 : Math.min(THROTTLE.maxDelaySec, 2 ** (failures - free + 1)))

/** Checks the backoff for `key` (an e-mail, or "password:<user id>") and `ip`, then records this attempt. */
export async function beginAttempt(db: Kysely<Database>, key: string, ip: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    // Count-then-record must not interleave, or parallel guesses all see the same count and pass.
    // SQLite: BEGIN IMMEDIATE already serialises writers. PostgreSQL (several instances): advisory
    // locks on the account key and the address for this transaction, always in that order.
    if (isPostgres(trx)) {
      await sql`select pg_advisory_xact_lock(hashtext(${`sign-in key:${key}`}))`.execute(trx)
      await sql`select pg_advisory_xact_lock(hashtext(${`sign-in ip:${ip}`}))`.execute(trx)
    }
    const now = nowMs()
    const since = new Date(now - THROTTLE.windowMin * 60_000).toISOString()
    const stats = async (col: 'email' | 'ip', value: string) => {
      const r = await trx.selectFrom('sign_in_failures').select((eb) => [eb.fn.countAll<number>().as('n'), eb.fn.max('at').as('last')])
        .where(col, '=', value).where('at', '>', since).executeTakeFirstOrThrow()
      return { n: Number(r.n), last: r.last ? Date.parse(String(r.last)) : 0 }
    }
    const byKey = await stats('email', key)
    const byIp = await stats('ip', ip)
    const wait = Math.max(
      delaySec(byKey.n, THROTTLE.freeByKey) * 1000 - (now - byKey.last),
      delaySec(byIp.n, THROTTLE.freeByIp) * 1000 - (now - byIp.last),
    )
    if (wait > 0) throw new ThrottledError(Math.ceil(wait / 1000))
    await trx.insertInto('sign_in_failures').values({ email: key, ip, at: new Date(now).toISOString() }).execute()
    await trx.deleteFrom('sign_in_failures').where('at', '<', new Date(now - 24 * 3600_000).toISOString()).execute()
  })
}

/** The attempt failed: it stays recorded; the audit log says so. */
export async function recordFailure(db: Kysely<Database>, key: string, ip: string): Promise<void> {
  await audit(db, { action: 'sign_in_failed', ip, detail: { email: key } })
}

/** The attempt succeeded: the key's record is cleared. */
export async function recordSuccess(db: Kysely<Database>, user: User, ip: string, key = user.email): Promise<void> {
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('sign_in_failures').where('email', '=', key).execute()
    if (key === user.email) await audit(trx, { action: 'sign_in', actorUserId: user.id, subjectUserId: user.id, ip })
  })
}

export class EmailTakenError extends Error {}

/**
 * Creates an account. A self-registered one starts unconfirmed and gets a confirmation e-mail in the
 * same transaction; one an organiser invites counts as confirmed (the organiser vouches for the address).
 */
export async function createUser(db: Kysely<Database>, input: { name: string; email: string; passwordHash: string; role: Role },
  actorId: number | null, ip: string | null, action: 'sign_up' | 'invite', appUrl?: string): Promise<User> {
  return db.transaction().execute(async (trx) => {
    const exists = await trx.selectFrom('users').select('id').where('email', '=', input.email).executeTakeFirst()
    if (exists) throw new EmailTakenError('That e-mail address already has an account')
    const user = await trx.insertInto('users').values({
      name: input.name, email: input.email, password_hash: input.passwordHash, role: input.role,
      email_confirmed_at: action === 'invite' ? nowIso() : null,
    }).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action, actorUserId: actorId ?? user.id, subjectUserId: user.id, ip, detail: { role: input.role } })
    if (action === 'sign_up' && appUrl) await sendEmailConfirmation(trx, user, appUrl)
    return user
  })
}

/** Confirmation links last two days; the token is stored only as its SHA-256. */
const CONFIRMATION_HOURS = 48
const tokenHash = (token: string) => createHash('sha256').update(token).digest('hex')

export async function sendEmailConfirmation(trx: Transaction<Database> | Kysely<Database>, user: Pick<User, 'id' | 'name' | 'email'>, appUrl: string) {
  const token = randomBytes(24).toString('base64url')
  await trx.insertInto('email_confirmations').values({ token_hash: tokenHash(token), user_id: user.id, expires_at: new Date(nowMs() + CONFIRMATION_HOURS * 3600_000).toISOString() }).execute()
  await enqueueMail(trx, { kind: 'confirm-email', to: { email: user.email, name: user.name }, ...confirmEmailMail({ name: user.name, url: `${appUrl}/verify-email?token=${token}`, hours: CONFIRMATION_HOURS }) })
}

export class InvalidTokenError extends Error {}

/** Confirms the address behind a link's token (once, before it expires). */
export async function confirmEmail(db: Kysely<Database>, token: string): Promise<User> {
  return db.transaction().execute(async (trx) => {
    const row = await trx.selectFrom('email_confirmations').selectAll().where('token_hash', '=', tokenHash(token)).executeTakeFirst()
    if (!row || row.used_at || row.expires_at < nowIso()) throw new InvalidTokenError('This link is not valid any more: sign in and ask for a new one')
    const now = nowIso()
    await trx.updateTable('email_confirmations').set({ used_at: now }).where('token_hash', '=', row.token_hash).execute()
    const user = await trx.updateTable('users').set({ email_confirmed_at: now }).where('id', '=', row.user_id).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action: 'email_confirmed', actorUserId: user.id, subjectUserId: user.id })
    return user
  })
}

export async function changeRole(db: Kysely<Database>, actor: User, userId: number, role: Role, ip: string): Promise<User | null> {
  return db.transaction().execute(async (trx) => {
    const target = await trx.selectFrom('users').selectAll().where('id', '=', userId).executeTakeFirst()
    if (!target) return null
    if (target.role === role) return target
    if (target.role === 'organiser' && role !== 'organiser') {
      const [{ n }] = await trx.selectFrom('users').select((eb) => eb.fn.countAll<number>().as('n'))
        .where('role', '=', 'organiser').execute() as [{ n: number }]
      if (Number(n) <= 1) throw new Error('The last organiser cannot be demoted')
    }
    // A role change ends the user's sessions: the next request signs in afresh under the new role.
    const updated = await trx.updateTable('users').set((eb) => ({ role, session_version: eb('session_version', '+', 1) })).where('id', '=', userId).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action: 'role_change', actorUserId: actor.id, subjectUserId: userId, ip, detail: { from: target.role, to: role } })
    return updated
  })
}

/** A readable one-time password for invited accounts (shown once to the organiser). */
export function temporaryPassword(): string {
  return randomBytes(9).toString('base64url')
}
