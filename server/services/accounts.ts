import { createHash, randomBytes } from 'node:crypto'
import { sql, type Kysely, type Transaction } from 'kysely'
import { isPostgres } from '../database/dialect'
import type { Database, Role, User } from '../database/schema'
import { audit } from './audit'
import { confirmEmailMail, invitationMail, passwordResetMail, passwordResetNoAccountMail } from './mailTemplates'
import { enqueueMail, SECRET_TOKEN } from './outbox'
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
 * same transaction; one an organiser invites counts as confirmed (the organiser vouches for the
 * address) and gets its invitation link, with which the invitee chooses a first password.
 */
export async function createUser(db: Kysely<Database>, input: { name: string; email: string; passwordHash: string; role: Role; locale?: string },
  actorId: number | null, ip: string | null, action: 'sign_up' | 'invite', appUrl?: string, inviter?: string): Promise<User> {
  return db.transaction().execute(async (trx) => {
    const exists = await trx.selectFrom('users').select('id').where('email', '=', input.email).executeTakeFirst()
    if (exists) throw new EmailTakenError('That e-mail address already has an account')
    const user = await trx.insertInto('users').values({
      name: input.name, email: input.email, password_hash: input.passwordHash, role: input.role,
      email_confirmed_at: action === 'invite' ? nowIso() : null,
      ...(input.locale ? { locale: input.locale } : {}),
    }).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action, actorUserId: actorId ?? user.id, subjectUserId: user.id, ip, detail: { role: input.role } })
    if (action === 'sign_up' && appUrl) await sendEmailConfirmation(trx, user, appUrl)
    if (action === 'invite' && appUrl) await sendInvitation(trx, user, appUrl, inviter ?? 'Your organiser')
    return user
  })
}

/** Confirmation links last two days; the token is stored only as its SHA-256. */
const CONFIRMATION_HOURS = 48
const tokenHash = (token: string) => createHash('sha256').update(token).digest('hex')

export async function sendEmailConfirmation(trx: Transaction<Database> | Kysely<Database>, user: Pick<User, 'id' | 'name' | 'email' | 'locale'>, appUrl: string) {
  const token = randomBytes(24).toString('base64url')
  await trx.insertInto('email_confirmations').values({ token_hash: tokenHash(token), user_id: user.id, expires_at: new Date(nowMs() + CONFIRMATION_HOURS * 3600_000).toISOString() }).execute()
  await enqueueMail(trx, { kind: 'confirm-email', to: { email: user.email, name: user.name }, secret: token, locale: user.locale,
    ...confirmEmailMail({ name: user.name, url: `${appUrl}/verify-email?token=${SECRET_TOKEN}`, hours: CONFIRMATION_HOURS, locale: user.locale }) })
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

/** An advisory-lock key for role changes on PostgreSQL (any constant; "roles" in ASCII). */
export const ROLE_CHANGE_LOCK = 0x726f6c6573

export class LastOrganiserError extends Error {}
export class NotOrganiserError extends Error {}

export async function changeRole(db: Kysely<Database>, actor: User, userId: number, role: Role, ip: string): Promise<User | null> {
  return db.transaction().execute(async (trx) => {
    // Count-then-change must not interleave, or two organisers demoting each other at once both
    // count two organisers and leave none. SQLite: BEGIN IMMEDIATE already serialises writers.
    // PostgreSQL (several instances, READ COMMITTED): one transaction-scoped advisory lock for every
    // role change, taken before anything is read.
    if (isPostgres(trx)) await sql`select pg_advisory_xact_lock(${ROLE_CHANGE_LOCK})`.execute(trx)
    // The actor was checked before the lock; a demotion that committed meanwhile counts.
    const acting = await trx.selectFrom('users').select('role').where('id', '=', actor.id).executeTakeFirst()
    if (acting?.role !== 'organiser') throw new NotOrganiserError('Only an organiser can change roles')
    const target = await trx.selectFrom('users').selectAll().where('id', '=', userId).executeTakeFirst()
    if (!target) return null
    if (target.role === role) return target
    if (target.role === 'organiser' && role !== 'organiser') {
      const [{ n }] = await trx.selectFrom('users').select((eb) => eb.fn.countAll<number>().as('n'))
        .where('role', '=', 'organiser').execute() as [{ n: number }]
      if (Number(n) <= 1) throw new LastOrganiserError('The last organiser cannot be demoted')
    }
    // A role change ends the user's sessions: the next request signs in afresh under the new role.
    const updated = await trx.updateTable('users').set((eb) => ({ role, session_version: eb('session_version', '+', 1) })).where('id', '=', userId).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { action: 'role_change', actorUserId: actor.id, subjectUserId: userId, ip, detail: { from: target.role, to: role } })
    return updated
  })
}

/**
 * Links that set a password: a reset lasts an hour, an invitation seven days. Each works once and
 * only the SHA-256 of its token is stored; a newer link for the same person ends the older ones.
 */
export const PASSWORD_LINK = { resetMinutes: 60, inviteDays: 7 }

type Db = Transaction<Database> | Kysely<Database>

/**
 * Ends a user's unused password links: those of one purpose when a newer link of that purpose
 * replaces them (so asking for a reset never kills a pending invitation), or all of them once one was used.
 */
async function endPasswordLinks(trx: Db, userId: number, now: string, purpose?: 'reset' | 'invite') {
  let q = trx.updateTable('account_tokens').set({ used_at: now }).where('user_id', '=', userId).where('used_at', 'is', null)
  if (purpose) q = q.where('purpose', '=', purpose)
  await q.execute()
}

async function issuePasswordLink(trx: Db, userId: number, purpose: 'reset' | 'invite'): Promise<string> {
  const now = nowMs()
  const token = randomBytes(24).toString('base64url')
  const lifeMs = purpose === 'reset' ? PASSWORD_LINK.resetMinutes * 60_000 : PASSWORD_LINK.inviteDays * 24 * 3600_000
  await endPasswordLinks(trx, userId, new Date(now).toISOString(), purpose)
  await trx.insertInto('account_tokens').values({ token_hash: tokenHash(token), user_id: userId, purpose, expires_at: new Date(now + lifeMs).toISOString(), created_at: new Date(now).toISOString() }).execute()
  return token
}

const passwordUrl = (appUrl: string, purpose: 'reset' | 'invite') => `${appUrl}/reset-password?token=${SECRET_TOKEN}${purpose === 'invite' ? '&invite=1' : ''}`

async function sendInvitation(trx: Db, user: Pick<User, 'id' | 'name' | 'email' | 'role' | 'locale'>, appUrl: string, inviter: string) {
  const token = await issuePasswordLink(trx, user.id, 'invite')
  await enqueueMail(trx, { kind: 'invitation', to: { email: user.email, name: user.name }, secret: token, locale: user.locale,
    ...invitationMail({ name: user.name, inviter, role: user.role, url: passwordUrl(appUrl, 'invite'), days: PASSWORD_LINK.inviteDays, locale: user.locale }) })
}

/**
 * A password no one knows, for an invited account until its owner chooses one: the hash of 32
 * random bytes that are thrown away. It is an ordinary hash, so signing in against it takes as long
 * as against any other and tells nothing.
 */
export async function unusablePasswordHash(hash: (plain: string) => Promise<string>): Promise<string> {
  return hash(randomBytes(32).toString('base64url'))
}

/**
 * "Forgot your password": the same work whether or not the address has an account, so neither the
 * answer nor its timing tells who is registered. A known address gets a reset link (ending its
 * older unused links); an unknown one is told that no account uses it.
 */
export async function requestPasswordReset(db: Kysely<Database>, email: string, appUrl: string, ip: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    const user = await trx.selectFrom('users').select(['id', 'name', 'email', 'locale']).where('email', '=', email).executeTakeFirst()
    await audit(trx, { action: 'password_reset_requested', subjectUserId: user?.id ?? null, ip, detail: { email } })
    if (user) {
      const token = await issuePasswordLink(trx, user.id, 'reset')
      await enqueueMail(trx, { kind: 'password-reset', to: { email: user.email, name: user.name }, secret: token, locale: user.locale,
        ...passwordResetMail({ name: user.name, url: passwordUrl(appUrl, 'reset'), minutes: PASSWORD_LINK.resetMinutes, locale: user.locale }) })
    } else {
      // The same statements as for a known address (the links of "no one" end: none), then the mail.
      await endPasswordLinks(trx, -1, nowIso(), 'reset')
      await enqueueMail(trx, { kind: 'password-reset', to: { email }, ...passwordResetNoAccountMail({ signUpUrl: `${appUrl}/register` }) })
    }
  })
}

/** Whether a password link still works (a cheap look before the costly password hash). */
export async function passwordLinkUsable(db: Kysely<Database>, token: string): Promise<boolean> {
  const row = await db.selectFrom('account_tokens').select(['used_at', 'expires_at']).where('token_hash', '=', tokenHash(token)).executeTakeFirst()
  return !!row && !row.used_at && row.expires_at > nowIso()
}

/**
 * Sets the password behind a reset or invitation link: once, before it expires. Every session of
 * the user ends (the session version rises), every other unused link of theirs ends, and the
 * address counts as confirmed (the link reached it).
 */
export async function resetPassword(db: Kysely<Database>, token: string, passwordHash: string, ip: string): Promise<User> {
  return db.transaction().execute(async (trx) => {
    const now = nowIso()
    // Spend the link first, conditionally: of two uses at once, only one updates a row.
    const spent = await trx.updateTable('account_tokens').set({ used_at: now })
      .where('token_hash', '=', tokenHash(token)).where('used_at', 'is', null).where('expires_at', '>', now)
      .returning(['user_id', 'purpose']).executeTakeFirst()
    if (!spent) throw new InvalidTokenError('This link is not valid any more: ask for a new one')
    await endPasswordLinks(trx, spent.user_id, now)
    const before = await trx.selectFrom('users').select('email_confirmed_at').where('id', '=', spent.user_id).executeTakeFirstOrThrow()
    if (!before.email_confirmed_at) {
      // Whoever set up this account never proved the address: a second factor they turned on is not
      // the owner's, and must not lock the owner out now that the link proved it.
      await trx.deleteFrom('totp_recovery_codes').where('user_id', '=', spent.user_id).execute()
      await trx.deleteFrom('user_totp').where('user_id', '=', spent.user_id).execute()
    }
    const user = await trx.updateTable('users').set((eb) => ({
      password_hash: passwordHash, session_version: eb('session_version', '+', 1),
      email_confirmed_at: eb.fn.coalesce('email_confirmed_at', eb.val(now)),
    })).where('id', '=', spent.user_id).returningAll().executeTakeFirstOrThrow()
    // A new password starts afresh: earlier failed sign-ins no longer hold the account back. Not with
    // two-factor on: those failures may be guesses at the code, and a reset must not renew them.
    const twoFactor = await trx.selectFrom('user_totp').select('enabled_at').where('user_id', '=', user.id).executeTakeFirst()
    if (!twoFactor?.enabled_at) await trx.deleteFrom('sign_in_failures').where('email', '=', user.email).execute()
    await audit(trx, { action: spent.purpose === 'invite' ? 'invitation_accepted' : 'password_reset', actorUserId: user.id, subjectUserId: user.id, ip })
    return user
  })
}
