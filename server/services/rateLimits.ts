import type { ExpressionBuilder, Kysely, QueryCreator } from 'kysely'
import { isPostgres } from '../database/dialect'
import type { Database } from '../database/schema'
import { nowIso, nowMs } from './clock'
import { LocalLimiter } from '../utils/localLimiter'

/**
 * Limits abuse-prone requests per key (sign-up per address, seat holds per account, public routes
 * per address).
 * - SQLite (the embedded, one-process set-up): a sliding window kept in this process's memory
 *   (LocalLimiter), for at most LOCAL_KEYS_MAX keys, the one used longest ago forgotten first. A key
 *   takes about 200 bytes in normal use and at most a few kB (a hit in every 1/60 of its window).
 * - PostgreSQL (several instances): counted in the database (rate_limit_hits, one row per key and
 *   1/60 of the window) with one atomic upsert per request, so every instance sees the same count;
 *   the same sliding window as the local one, so both set-ups refuse the same requests. The upsert is
 *   also offered as a CTE (hitUpsert, windowCounts), so a statement that does the request's work can
 *   count it in the same round trip (the seat hold does).
 */
export const LOCAL_KEYS_MAX = 50_000
const SHARED_SLOTS = 60
const local = new LocalLimiter(LOCAL_KEYS_MAX)

export interface RateLimit { key: string; limit: number; windowMs: number }

/** Over the limit: not counted; `retryAfterSec` until the request would pass. */
export class RateLimitedError extends Error {
  constructor(public retryAfterSec: number) { super(`Too many requests: try again in ${retryAfterSec} s`) }
}

/** Where a request at `now` falls: its slot (1/60 of the window) and the window's oldest slot. */
export interface WindowSlots { slotMs: number; current: number; slotStart: string; from: string; expiresAt: string; now: number }

/** What the statements below need of WindowSlots: the slot's start, the window's start, the row's expiry. */
export type SlotBounds = Pick<WindowSlots, 'slotStart' | 'from' | 'expiresAt'>

export function windowSlots(windowMs: number, now = nowMs()): WindowSlots {
  const slotMs = windowMs / SHARED_SLOTS
  const current = Math.floor(now / slotMs)
  return {
    slotMs, current, now,
    slotStart: new Date(current * slotMs).toISOString(),
    from: new Date((current - SHARED_SLOTS) * slotMs).toISOString(),
    expiresAt: new Date((current + SHARED_SLOTS + 2) * slotMs).toISOString(),
  }
}

/**
 * The upsert counting one hit in the current slot, for a CTE; RETURNING the slot's new count as
 * `hits`. With `add` 0 it counts nothing and only reads the slot (a request counted earlier, asking again).
 */
export function hitUpsert(w: QueryCreator<Database>, key: string, s: SlotBounds, add: 0 | 1 = 1) {
  return w.insertInto('rate_limit_hits')
    .values({ key, window_start: s.slotStart, hits: add, expires_at: s.expiresAt })
    .onConflict((oc) => oc.columns(['key', 'window_start']).doUpdateSet((eb) => ({ hits: eb('rate_limit_hits.hits', '+', add) })))
    .returning('hits')
}

/**
 * The window's other slots, as two select expressions: their sum (`others`) and the oldest slot's
 * start (`oldest`). A CTE's change is not visible to its siblings, so the current slot's count comes
 * from hitUpsert's RETURNING and is left out here; a slot that straddles the window's start is counted
 * in full (the count errs on the side of refusing), as in LocalLimiter.
 */
export function windowCounts<DB extends Database, TB extends keyof DB>(eb: ExpressionBuilder<DB, TB>, key: string, s: SlotBounds) {
  return [
    othersSum(eb, key, s).as('limitOthers'),
    otherSlots(eb, key, s).select((q) => q.fn.min<string>('window_start').as('w')).as('limitOldest'),
  ] as const
}

/** The sum of the window's other slots (see windowCounts), as a subquery. */
export function othersSum<DB extends Database, TB extends keyof DB>(eb: ExpressionBuilder<DB, TB>, key: string, s: SlotBounds) {
  return otherSlots(eb, key, s).select((q) => q.fn.coalesce(q.fn.sum<number>('hits'), q.val(0)).as('n'))
}

/** The rows of the window's slots other than the current one. */
function otherSlots<DB extends Database, TB extends keyof DB>(eb: ExpressionBuilder<DB, TB>, key: string, s: SlotBounds) {
  return (eb as unknown as ExpressionBuilder<Database, never>).selectFrom('rate_limit_hits')
    .where('key', '=', key).where('window_start', '>=', s.from).where('window_start', '<>', s.slotStart)
}

/**
 * After a counted hit turned out to be over the limit: takes it back (a refused request is not
 * counted) and returns the error saying when to try again.
 */
export async function refuseCounted(db: Kysely<Database>, key: string, s: WindowSlots, oldest: string | null): Promise<RateLimitedError> {
  await db.updateTable('rate_limit_hits').set((eb) => ({ hits: eb('hits', '-', 1) }))
    .where('key', '=', key).where('window_start', '=', s.slotStart).execute()
  const oldestSlot = Math.round(Date.parse(oldest ?? s.slotStart) / s.slotMs)
  return new RateLimitedError(Math.max(1, Math.ceil(((oldestSlot + SHARED_SLOTS + 1) * s.slotMs - s.now) / 1000)))
}

/** Counts one request under `rl`; throws RateLimitedError (and does not count it) when over the limit. */
export async function countHit(db: Kysely<Database>, rl: RateLimit): Promise<void> {
  if (!isPostgres(db)) {
    const retryAfterSec = local.hit(rl.key, rl.limit, rl.windowMs, nowMs())
    if (retryAfterSec !== null) throw new RateLimitedError(retryAfterSec)
    return
  }
  // One round trip: the upsert counts this hit, the same statement adds the window's other slots.
  const s = windowSlots(rl.windowMs)
  const r = await db.with('up', (w) => hitUpsert(w, rl.key, s))
    .selectFrom('up').select((eb) => ['up.hits', ...windowCounts(eb, rl.key, s)])
    .executeTakeFirstOrThrow()
  if (Number(r.hits) + Number(r.limitOthers ?? 0) <= rl.limit) return
  throw await refuseCounted(db, rl.key, s, r.limitOldest)
}

/** Drops expired windows (housekeeping). */
export async function pruneRateLimits(db: Kysely<Database>): Promise<void> {
  await db.deleteFrom('rate_limit_hits').where('expires_at', '<', nowIso()).execute()
}
