import type { H3Event } from 'h3'
import type { Kysely } from 'kysely'
import type { Database, User } from '../database/schema'
import { beginAttempt, ThrottledError } from '../services/accounts'
import { checkSecondFactor, TotpError } from '../services/totp'

/** beginAttempt (the sign-in backoff for `key` and `ip`), answering 429 with Retry-After while it says wait. */
export async function beginAttemptOr429(event: H3Event, db: Kysely<Database>, key: string, ip: string): Promise<void> {
  try {
    await beginAttempt(db, key, ip)
  } catch (e) {
    if (e instanceof ThrottledError) {
      setResponseHeader(event, 'Retry-After', e.retryAfterSec)
      throw createError({ statusCode: 429, statusMessage: 'Too many attempts', message: `Too many failed attempts. Try again in ${e.retryAfterSec} s.` })
    }
    throw e
  }
}

/**
 * checkSecondFactor, answering 429 totp_locked with Retry-After while the account's app codes are
 * locked after too many wrong ones (server/services/totp.ts, TOTP_LOCK).
 */
export async function secondFactorOr429(event: H3Event, db: Kysely<Database>, user: User, input: string, ip: string): Promise<boolean> {
  try {
    return await checkSecondFactor(db, user, input, ip)
  } catch (e) {
    if (e instanceof TotpError && e.code === 'totp_locked') {
      setResponseHeader(event, 'Retry-After', e.retryAfterSec ?? 60)
      throw createError({ statusCode: 429, statusMessage: 'Too many attempts', message: e.message, data: { code: e.code, fields: { totp: e.message } } })
    }
    throw e
  }
}
