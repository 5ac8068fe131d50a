import type { H3Event } from 'h3'
import type { Kysely } from 'kysely'
import { isPostgres } from '../database/dialect'
import type { Database } from '../database/schema'
import { nowIso, nowMs } from '../services/clock'
import { LocalLimiter } from './localLimiter'

/**
 * Limits abuse-prone requests per key (sign-up per address, seat holds per account, public routes
 * per address).
 * - SQLite (the embedded, one-process set-up): a sliding window kept in this process's memory
 *   (LocalLimiter), for at most LOCAL_KEYS_MAX keys, the one used longest ago forgotten first. A key
 *   takes about 200 bytes in normal use and at most a few kB (a hit in every 1/60 of its window).
 * - PostgreSQL (several instances): counted in the database (rate_limit_hits) with one atomic upsert
 *   per request, so every instance sees the same count; a sliding window estimated from the current
 *   and the previous fixed window.
 */
export const LOCAL_KEYS_MAX = 50_000
const local = new LocalLimiter(LOCAL_KEYS_MAX)

function refuse(event: H3Event, retryAfterSec: number): never {
  setResponseHeader(event, 'Retry-After', retryAfterSec)
  throw createError({ statusCode: 429, statusMessage: 'Too many requests', message: `Too many requests: try again in ${retryAfterSec} s`, data: { code: 'rate_limited', retryAfterSec } })
}

export async function rateLimit(event: H3Event, key: string, limit: number, windowMs: number): Promise<void> {
  await dbReady()
  const db = useDb()
  if (isPostgres(db)) return sharedRateLimit(event, db, key, limit, windowMs)
  const retryAfterSec = local.hit(key, limit, windowMs, nowMs())
  if (retryAfterSec !== null) refuse(event, retryAfterSec)
}

async function sharedRateLimit(event: H3Event, db: Kysely<Database>, key: string, limit: number, windowMs: number): Promise<void> {
  const now = nowMs()
  const start = Math.floor(now / windowMs) * windowMs
  const row = await db.insertInto('rate_limit_hits')
    // Kept two windows: the next window still reads this one.
    .values({ key, window_start: new Date(start).toISOString(), hits: 1, expires_at: new Date(start + 2 * windowMs).toISOString() })
    .onConflict((oc) => oc.columns(['key', 'window_start']).doUpdateSet((eb) => ({ hits: eb('rate_limit_hits.hits', '+', 1) })))
    .returning('hits').executeTakeFirstOrThrow()
  // A sliding window from two fixed ones: the previous window's count, weighted by how much of it
  // still lies within the last windowMs, plus this window's. A burst across a window boundary is
  // still counted (plain fixed windows would let up to twice the limit through there).
  const prev = await db.selectFrom('rate_limit_hits').select('hits').where('key', '=', key)
    .where('window_start', '=', new Date(start - windowMs).toISOString()).executeTakeFirst()
  const estimate = Number(row.hits) + Number(prev?.hits ?? 0) * (1 - (now - start) / windowMs)
  if (estimate > limit) refuse(event, Math.max(1, Math.ceil((start + windowMs - now) / 1000)))
}

/** Drops expired windows (housekeeping). */
export async function pruneRateLimits(db: Kysely<Database>): Promise<void> {
  await db.deleteFrom('rate_limit_hits').where('expires_at', '<', nowIso()).execute()
}
