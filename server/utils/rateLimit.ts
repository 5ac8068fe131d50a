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
 * - PostgreSQL (several instances): counted in the database (rate_limit_hits, one row per key and
 *   1/60 of the window) with one atomic upsert per request, so every instance sees the same count;
 *   the same sliding window as the local one, so both set-ups refuse the same requests.
 */
export const LOCAL_KEYS_MAX = 50_000
const SHARED_SLOTS = 60
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
  // The same sliding window as LocalLimiter: counts per 1/SHARED_SLOTS of the window, the slot that
  // straddles the window's start counted in full (so the count errs on the side of refusing).
  const now = nowMs()
  const slotMs = windowMs / SHARED_SLOTS
  const current = Math.floor(now / slotMs)
  const slotStart = new Date(current * slotMs).toISOString()
  // One round trip: the upsert counts this hit, and the same statement adds the window's other
  // slots (a CTE's change is not visible to its siblings, so this slot's count comes from RETURNING).
  const from = new Date((current - SHARED_SLOTS) * slotMs).toISOString()
  const r = await db
    .with('up', (w) => w.insertInto('rate_limit_hits')
      .values({ key, window_start: slotStart, hits: 1, expires_at: new Date((current + SHARED_SLOTS + 2) * slotMs).toISOString() })
      .onConflict((oc) => oc.columns(['key', 'window_start']).doUpdateSet((eb) => ({ hits: eb('rate_limit_hits.hits', '+', 1) })))
      .returning('hits'))
    .selectFrom('up')
    .select((eb) => [
      'up.hits',
      eb.selectFrom('rate_limit_hits').select((s) => s.fn.coalesce(s.fn.sum<number>('hits'), s.val(0)).as('n'))
        .where('key', '=', key).where('window_start', '>=', from).where('window_start', '<>', slotStart).as('others'),
      eb.selectFrom('rate_limit_hits').select((s) => s.fn.min<string>('window_start').as('w'))
        .where('key', '=', key).where('window_start', '>=', from).where('window_start', '<>', slotStart).as('oldest'),
    ])
    .executeTakeFirstOrThrow()
  const count = Number(r.hits) + Number(r.others ?? 0)
  if (count <= limit) return
  // Refused requests are not counted (as in LocalLimiter): take this one back.
  await db.updateTable('rate_limit_hits').set((eb) => ({ hits: eb('hits', '-', 1) }))
    .where('key', '=', key).where('window_start', '=', slotStart).execute()
  const oldestSlot = Math.round(Date.parse(r.oldest ?? slotStart) / slotMs)
  refuse(event, Math.max(1, Math.ceil(((oldestSlot + SHARED_SLOTS + 1) * slotMs - now) / 1000)))
}

/** Drops expired windows (housekeeping). */
export async function pruneRateLimits(db: Kysely<Database>): Promise<void> {
  await db.deleteFrom('rate_limit_hits').where('expires_at', '<', nowIso()).execute()
}
