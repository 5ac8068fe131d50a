import { createHash, randomBytes, timingSafeEqual } from 'node:crypto'
import { base32 } from '@otplib/plugin-base32-scure'
import { NodeCryptoPlugin } from '@otplib/plugin-crypto-node'
import { generateSync } from '@otplib/totp'
import { generateTOTP } from '@otplib/uri'
import { sql, type Kysely, type Transaction } from 'kysely'
import { isPostgres } from '../database/dialect'
import QRCode from 'qrcode'
import type { Database, Role, User } from '../database/schema'
import type { SecuritySettings, TotpSetup, TotpStatus } from '../../shared/schemas/totp'
import { audit } from './audit'
import { nowIso, nowMs } from './clock'
import { seal, SealError, unseal } from './sealed'
import { getSetting, putSetting } from './settings'

/**
 * Two-factor sign-in with time-based one-time passwords (TOTP, RFC 6238): HMAC-SHA-1, 6 digits,
 * 30-second steps counted from the Unix epoch, which is what authenticator apps expect. Every "now"
 * comes from the clock service. A code is accepted for its own step and one step either side (clock
 * drift between phone and server, RFC 6238 §5.2), and only once: the last accepted step is stored.
 *
 * Codes, Base32 and the key URI come from otplib's own packages with its node:crypto plugin (the
 * umbrella package's default hashing plugin is a second major version of a library the PDF renderer
 * also uses, and the server bundle can hold only one; the tests use the umbrella package to check).
 *
 * The secret is sealed at rest (AES-256-GCM, ./sealed) bound to "totp:<user id>"; a secret offered
 * for set-up but not yet confirmed is sealed to "totp-pending:<user id>", so one cannot be copied
 * over the other. Recovery codes are 80 random bits each, stored only as SHA-256.
 */
export const TOTP = { periodSec: 30, digits: 6, driftSteps: 1, issuer: 'Umbrafield', secretBytes: 20, recoveryCodes: 10 } as const

const STAFF: readonly Role[] = ['organiser', 'guide']
export const isStaff = (role: Role) => STAFF.includes(role)

export const activeContext = (userId: number) => `totp:${userId}`
export const pendingContext = (userId: number) => `totp-pending:${userId}`

/** A refusal with an HTTP status and a machine-readable code (mapped in server/utils/errors.ts). */
export class TotpError extends Error {
  constructor(public statusCode: number, public code: string, message: string, public field?: string, public retryAfterSec?: number) { super(message) }
}

/**
 * Lockout on app codes, per account and from any address: after ten wrong 6-digit codes inside 24
 * hours, app codes are refused (429 totp_locked) until the oldest of them is a day old. The sign-in
 * backoff alone still lets about forty guesses an hour through (its window is 15 minutes); this caps
 * guessing at ten a day, a chance of about 3 in 100 000 with three codes valid at a time (±1 step).
 * A success does not wipe the count, so guesses cannot be spread between the owner's sign-ins.
 * Recovery codes (80 random bits, not guessable) still work, so the owner is never shut out.
 */
export const TOTP_LOCK = { maxFailures: 10, windowHours: 24 } as const
const lockKey = (userId: number) => `totp:${userId}`

/**
 * Counts the account's recent wrong app codes and, unless locked, records this attempt as one (in the
 * same transaction, so parallel guesses queue rather than all slipping under the limit). Returns the
 * recorded row's id, to be deleted if the code turns out right.
 */
async function beginCodeAttempt(db: Kysely<Database>, userId: number): Promise<number> {
  return db.transaction().execute(async (trx) => {
    // SQLite: BEGIN IMMEDIATE serialises writers already; PostgreSQL: an advisory lock on the key.
    if (isPostgres(trx)) await sql`select pg_advisory_xact_lock(hashtext(${lockKey(userId)}))`.execute(trx)
    const now = nowMs()
    const windowMs = TOTP_LOCK.windowHours * 3600_000
    const r = await trx.selectFrom('sign_in_failures').select((eb) => [eb.fn.countAll<number>().as('n'), eb.fn.min('at').as('oldest')])
      .where('email', '=', lockKey(userId)).where('at', '>', new Date(now - windowMs).toISOString()).executeTakeFirstOrThrow()
    if (Number(r.n) >= TOTP_LOCK.maxFailures) {
      const retryAfterSec = Math.max(1, Math.ceil((Date.parse(String(r.oldest)) + windowMs - now) / 1000))
      throw new TotpError(429, 'totp_locked', 'Too many wrong codes for this account. Sign in with a recovery code, or try an app code again later.', 'totp', retryAfterSec)
    }
    // The address is not recorded here: the sign-in backoff already counts this attempt for it.
    const row = await trx.insertInto('sign_in_failures').values({ email: lockKey(userId), ip: '-', at: new Date(now).toISOString() })
      .returning('id').executeTakeFirstOrThrow()
    return Number(row.id)
  })
}

/** RFC 4648 §6 Base32 (no padding), the form authenticator apps take secrets in (otplib's scure plugin). */
export function base32Encode(bytes: Uint8Array): string {
  return base32.encode(bytes, { padding: false })
}
export function base32Decode(text: string): Buffer {
  return Buffer.from(base32.decode(text.toUpperCase().replace(/[\s=]/g, '')))
}

type Algorithm = 'sha1' | 'sha256' | 'sha512'
const crypto = new NodeCryptoPlugin()

/** The time step of `atMs` (ms since the Unix epoch, UTC): floor(seconds / 30), T0 = 0. */
export const timeStep = (atMs: number) => Math.floor(Math.floor(atMs / 1000) / TOTP.periodSec)

/**
 * The TOTP value of `secret` (Base32 text, or raw key bytes) at `atMs` (ms since the Unix epoch,
 * UTC): HOTP of the time step (RFC 6238 §4.2), computed by otplib on node:crypto.
 */
export function totpCode(secret: string | Uint8Array, atMs: number, opts: { digits?: 6 | 8; algorithm?: Algorithm } = {}): string {
  const key = typeof secret === 'string' ? base32Decode(secret) : secret
  return generateSync({ secret: key, epoch: Math.floor(atMs / 1000), period: TOTP.periodSec, digits: opts.digits ?? TOTP.digits, algorithm: opts.algorithm ?? 'sha1', crypto })
}

/**
 * The time step whose code `token` is, within ±driftSteps of `atMs` and after `afterStep`; null when
 * it matches none (or is not 6 digits).
 */
export function matchStep(secret: string, token: string, atMs: number, afterStep: number | null): number | null {
  if (!/^\d{6}$/.test(token)) return null
  const key = base32Decode(secret)
  const now = timeStep(atMs)
  for (let d = -TOTP.driftSteps; d <= TOTP.driftSteps; d++) {
    const step = now + d
    if (afterStep !== null && step <= afterStep) continue
    if (timingSafeEqual(Buffer.from(totpCode(key, step * TOTP.periodSec * 1000)), Buffer.from(token))) return step
  }
  return null
}

/** Recovery codes: 16 Base32 letters (80 random bits), shown as XXXX-XXXX-XXXX-XXXX. */
const newRecoveryCode = () => base32Encode(randomBytes(10)).match(/.{4}/g)!.join('-')
const normaliseRecovery = (code: string) => code.toUpperCase().replace(/[^A-Z2-7]/g, '')
const recoveryHash = (code: string) => createHash('sha256').update(normaliseRecovery(code)).digest('hex')

/** Whether the organisation requires two-factor sign-in for organisers and guides. */
export async function securitySettings(db: Kysely<Database> | Transaction<Database>): Promise<SecuritySettings> {
  return { requireStaffTotp: (await getSetting(db, 'require_staff_totp', false)) === true }
}

export async function updateSecuritySettings(db: Kysely<Database>, actor: User, patch: SecuritySettings, ip: string): Promise<SecuritySettings> {
  return db.transaction().execute(async (trx) => {
    const before = await securitySettings(trx)
    if (before.requireStaffTotp !== patch.requireStaffTotp) {
      await putSetting(trx, 'require_staff_totp', patch.requireStaffTotp, actor.id)
      await audit(trx, { action: 'security_settings', actorUserId: actor.id, ip, detail: { requireStaffTotp: { from: before.requireStaffTotp, to: patch.requireStaffTotp } } })
    }
    return securitySettings(trx)
  })
}

async function row(db: Kysely<Database> | Transaction<Database>, userId: number) {
  return db.selectFrom('user_totp').selectAll().where('user_id', '=', userId).executeTakeFirst()
}

export async function totpEnabled(db: Kysely<Database>, userId: number): Promise<boolean> {
  return !!(await row(db, userId))?.enabled_at
}

export async function totpStatus(db: Kysely<Database>, user: User): Promise<TotpStatus> {
  const r = await row(db, user.id)
  const enabled = !!r?.enabled_at
  const requiredByPolicy = isStaff(user.role) && (await securitySettings(db)).requireStaffTotp
  const left = enabled
    ? Number((await db.selectFrom('totp_recovery_codes').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('user_id', '=', user.id).where('used_at', 'is', null).executeTakeFirstOrThrow()).n)
    : 0
  return { enabled, pending: !enabled && !!r?.pending_sealed, enabledAt: r?.enabled_at ?? null, recoveryCodesLeft: left, requiredByPolicy, setupRequired: requiredByPolicy && !enabled }
}

/** Whether the staff rule blocks this user (staff, rule on, two-factor not on). */
export async function totpSetupRequired(db: Kysely<Database>, user: User): Promise<boolean> {
  if (!isStaff(user.role)) return false
  if (!(await securitySettings(db)).requireStaffTotp) return false
  return !(await totpEnabled(db, user.id))
}

/**
 * Offers a new secret for set-up (replacing any earlier offer). Refused while two-factor is on: a
 * stolen session must not be able to swap the second factor without the password (turn it off first).
 */
export async function startTotpSetup(db: Kysely<Database>, user: User): Promise<TotpSetup> {
  const existing = await row(db, user.id)
  if (existing?.enabled_at) throw new TotpError(409, 'totp_already_enabled', 'Two-factor sign-in is already on. Turn it off first to move it to another app.')
  const secret = base32Encode(randomBytes(TOTP.secretBytes))
  const pending = { pending_sealed: seal(secret, pendingContext(user.id)), pending_created_at: nowIso() }
  await db.insertInto('user_totp').values({ user_id: user.id, secret_sealed: null, enabled_at: null, last_step: null, ...pending })
    .onConflict((oc) => oc.column('user_id').doUpdateSet(pending)).execute()
  // Key URI format understood by authenticator apps: otpauth://totp/<issuer>:<account>?secret=…&issuer=…
  const otpauthUrl = generateTOTP({ issuer: TOTP.issuer, label: user.email, secret, algorithm: 'sha1', digits: TOTP.digits, period: TOTP.periodSec })
  const qrSvg = await QRCode.toString(otpauthUrl, { type: 'svg', errorCorrectionLevel: 'M', margin: 2 })
  return { secret, otpauthUrl, qrSvg }
}

/** Turns two-factor on when `code` matches the offered secret; returns the recovery codes (shown once). */
export async function confirmTotpSetup(db: Kysely<Database>, user: User, code: string, ip: string): Promise<string[]> {
  const r = await row(db, user.id)
  if (r?.enabled_at) throw new TotpError(409, 'totp_already_enabled', 'Two-factor sign-in is already on.')
  if (!r?.pending_sealed) throw new TotpError(409, 'totp_not_started', 'Start the set-up first: a new secret has not been offered.')
  const secret = unseal(r.pending_sealed, pendingContext(user.id))
  const step = matchStep(secret, code, nowMs(), null)
  if (step === null) throw new TotpError(400, 'totp_invalid', 'That code is not right. Check the time on your phone and try the newest code.', 'code')
  const codes = Array.from({ length: TOTP.recoveryCodes }, newRecoveryCode)
  await db.transaction().execute(async (trx) => {
    // Conditional on the very offer that was checked, so two confirmations cannot both win.
    const res = await trx.updateTable('user_totp')
      .set({ secret_sealed: seal(secret, activeContext(user.id)), enabled_at: nowIso(), pending_sealed: null, pending_created_at: null, last_step: step })
      .where('user_id', '=', user.id).where('pending_sealed', '=', r.pending_sealed).where('enabled_at', 'is', null)
      .executeTakeFirst()
    if (Number(res.numUpdatedRows) !== 1) throw new TotpError(409, 'totp_not_started', 'The set-up changed meanwhile: start again.')
    await trx.deleteFrom('totp_recovery_codes').where('user_id', '=', user.id).execute()
    await trx.insertInto('totp_recovery_codes').values(codes.map((c) => ({ user_id: user.id, code_hash: recoveryHash(c), used_at: null }))).execute()
    await audit(trx, { action: 'totp_enabled', actorUserId: user.id, subjectUserId: user.id, ip })
  })
  return codes
}

/**
 * Checks a second factor for a user with two-factor on: a current app code (once per step) or an
 * unused recovery code (then used up). Both are consumed with a conditional update, so two requests
 * racing with the same code cannot both pass.
 */
export async function checkSecondFactor(db: Kysely<Database>, user: User, input: string, ip: string): Promise<boolean> {
  const r = await row(db, user.id)
  if (!r?.enabled_at || !r.secret_sealed) return false
  const compact = input.replace(/\s+/g, '')
  if (/^\d{6}$/.test(compact)) {
    let secret: string
    try {
      secret = unseal(r.secret_sealed, activeContext(user.id))
    } catch (e) {
      // The data key that sealed it is gone: app codes cannot be checked; recovery codes still work.
      if (e instanceof SealError) return false
      throw e
    }
    const attempt = await beginCodeAttempt(db, user.id)
    const step = matchStep(secret, compact, nowMs(), r.last_step)
    if (step === null) return false
    const res = await db.updateTable('user_totp').set({ last_step: step }).where('user_id', '=', user.id)
      .where((eb) => eb.or([eb('last_step', 'is', null), eb('last_step', '<', step)])).executeTakeFirst()
    if (Number(res.numUpdatedRows) !== 1) return false
    // A right code is no guess: it leaves the count as it was.
    await db.deleteFrom('sign_in_failures').where('id', '=', attempt).execute()
    return true
  }
  if (normaliseRecovery(compact).length !== 16) return false
  return db.transaction().execute(async (trx) => {
    const res = await trx.updateTable('totp_recovery_codes').set({ used_at: nowIso() })
      .where('user_id', '=', user.id).where('code_hash', '=', recoveryHash(compact)).where('used_at', 'is', null).executeTakeFirst()
    if (Number(res.numUpdatedRows) !== 1) return false
    await audit(trx, { action: 'totp_recovery_code_used', actorUserId: user.id, subjectUserId: user.id, ip })
    return true
  })
}

/** Turns two-factor off (the caller checked password and code), unless the staff rule requires it. */
export async function disableTotp(db: Kysely<Database>, user: User, ip: string): Promise<void> {
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('totp_recovery_codes').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('user_totp').where('user_id', '=', user.id).execute()
    await audit(trx, { action: 'totp_disabled', actorUserId: user.id, subjectUserId: user.id, ip })
  })
}

/** Refuses to turn two-factor off for staff while the organisation requires it. */
export async function assertMayDisable(db: Kysely<Database>, user: User): Promise<void> {
  if (!(await totpEnabled(db, user.id))) throw new TotpError(409, 'totp_not_enabled', 'Two-factor sign-in is not on.')
  if (isStaff(user.role) && (await securitySettings(db)).requireStaffTotp) {
    throw new TotpError(409, 'totp_required_by_policy', 'Your organisation requires two-factor sign-in for staff, so it cannot be turned off.')
  }
}
