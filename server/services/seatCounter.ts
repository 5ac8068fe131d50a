import { sql, type Kysely, type Transaction } from 'kysely'
import type { Database } from '../database/schema'

/**
 * The trip's seat counter (table seat_counters). Invariant, kept by every change of a booking's or
 * offer's seats: claimed = Σ seats of bookings held or confirmed + Σ seats of waitlist offers.
 *
 * Seats are handed out by one conditional statement, `UPDATE … SET claimed = claimed + n WHERE
 * claimed + n <= seats RETURNING claimed`: on PostgreSQL the row is locked only from that statement
 * to the commit (callers issue it last), and a waiting statement re-checks the condition on the row
 * it finally sees (READ COMMITTED), so two instances never hand out the same seat. On SQLite the
 * transaction already holds the database's write lock. Nothing reads a count and then writes it.
 */
type Db = Kysely<Database> | Transaction<Database>

/** What the counter should hold, counted from the rows (used to create a missing counter and by tests). */
export async function countedSeats(db: Db, tripId: number): Promise<number> {
  const b = await db.selectFrom('bookings').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('seats'), eb.val(0)).as('n'))
    .where('trip_id', '=', tripId).where('status', 'in', ['held', 'confirmed']).executeTakeFirstOrThrow()
  const w = await db.selectFrom('waitlist').select((eb) => eb.fn.coalesce(eb.fn.sum<number>('seats'), eb.val(0)).as('n'))
    .where('trip_id', '=', tripId).where('status', '=', 'offered').executeTakeFirstOrThrow()
  return Number(b.n) + Number(w.n)
}

/**
 * Creates the trip's counter from its rows when it has none yet (trips made after the migration, the
 * demo seed). Call it before this transaction changes any seats of the trip, or outside one.
 */
export async function ensureSeatCounter(db: Db, tripId: number): Promise<void> {
  await db.insertInto('seat_counters').values({ trip_id: tripId, claimed: await countedSeats(db, tripId) })
    .onConflict((oc) => oc.column('trip_id').doNothing()).execute()
}

/** The counter, or undefined when the trip has none yet. */
export async function seatsClaimed(db: Db, tripId: number): Promise<number | undefined> {
  const r = await db.selectFrom('seat_counters').select('claimed').where('trip_id', '=', tripId).executeTakeFirst()
  return r ? Number(r.claimed) : undefined
}

/**
 * Hands out `n` seats of a published trip if that many remain: true when they were, false when not
 * (nothing changed). n ≤ 0 gives seats back and always succeeds. `recount`: when the trip has no
 * counter yet, make one from the rows first; only correct when this transaction has not yet changed
 * the trip's seats (createHold makes the counter before its transaction instead).
 */
export async function claimSeats(trx: Db, tripId: number, n: number, opts: { recount?: boolean } = {}): Promise<boolean> {
  if (n <= 0) {
    if (n < 0) await releaseSeats(trx, tripId, -n)
    return true
  }
  const attempt = () => trx.updateTable('seat_counters').set((eb) => ({ claimed: eb('claimed', '+', n) }))
    .where('trip_id', '=', tripId)
    .where((eb) => eb(eb('claimed', '+', n), '<=', sql<number>`(select seats from trips where id = ${tripId} and status = 'published')`))
    .returning('claimed').executeTakeFirst()
  if (await attempt()) return true
  if (opts.recount !== false && (await seatsClaimed(trx, tripId)) === undefined) {
    await ensureSeatCounter(trx, tripId)
    return !!(await attempt())
  }
  return false
}

/** Gives `n` seats back (a hold lapsed or cancelled, an offer expired, a booking cancelled). */
export async function releaseSeats(trx: Db, tripId: number, n: number): Promise<void> {
  if (n <= 0) return
  await trx.updateTable('seat_counters').set((eb) => ({ claimed: eb('claimed', '-', n) })).where('trip_id', '=', tripId).execute()
}
