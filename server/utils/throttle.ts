import type { H3Event } from 'h3'
import type { Kysely } from 'kysely'
import type { Database } from '../database/schema'
import { beginAttempt, ThrottledError } from '../services/accounts'

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
