import { sql, type Kysely, type Selectable } from 'kysely'
import type { LocalKind } from '../../shared/safety/text'
import type { Database, TripsTable, User } from '../database/schema'
import { auditValues } from './audit'
import * as T from './mailTemplates'
import { outboxValues } from './outbox'

/**
 * A hold as ONE statement (PostgreSQL): the seat counter's conditional UPDATE … RETURNING, the
 * booking, its audit row and its e-mail, written together by data-modifying CTEs, outside any
 * explicit transaction. The counter row is locked only while that statement runs, never across a
 * round trip to the app, so holds of one trip do not queue behind each other's commits.
 *
 * The booking takes its trip id from the counter's RETURNING: with no seats left the UPDATE returns
 * no row, the booking's trip_id is NULL, and the NOT NULL constraint fails the whole statement,
 * which then changes nothing. A second active hold of the same traveller on the trip fails the
 * partial unique index bookings_one_hold (migration 0022) the same way.
 */
export async function holdInOneStatement(db: Kysely<Database>, a: {
  user: User; trip: Selectable<TripsTable>; seats: number; holdExpiresAt: string; kind?: LocalKind; appUrl: string
}): Promise<{ id: number } | 'sold_out' | 'hold_exists'> {
  const { user, trip, seats } = a
  // The id first (a sequence never hands out the same number twice), so the e-mail can link to it.
  const id = Number((await sql<{ id: string }>`select nextval(pg_get_serial_sequence('bookings', 'id')) as id`.execute(db)).rows[0]!.id)
  const priceMinor = seats * trip.price_minor
  const depositMinor = seats * trip.deposit_minor
  const mail = T.bookingHeld({
    name: user.name, tripTitle: trip.title, seats, currency: trip.currency, priceMinor, paidMinor: 0, dueMinor: depositMinor,
    bookingUrl: `${a.appUrl}/bookings/${id}`, eclipseKind: a.kind, holdExpiresAt: a.holdExpiresAt, depositMinor, locale: user.locale,
  })
  try {
    await db
      .with('c', (w) => w.updateTable('seat_counters').set((eb) => ({ claimed: eb('claimed', '+', seats) }))
        .where('trip_id', '=', trip.id)
        .where((eb) => eb(eb('claimed', '+', seats), '<=', sql<number>`(select seats from trips where id = ${trip.id} and status = 'published')`))
        .returning('trip_id'))
      .with('b', (w) => w.insertInto('bookings').values({
        id, trip_id: sql<number>`(select trip_id from c)`, user_id: user.id, seats, status: 'held', hold_expires_at: a.holdExpiresAt,
        price_minor: priceMinor, deposit_minor: depositMinor, currency: trip.currency,
      }).returning('id'))
      .with('a', (w) => w.insertInto('audit_log').values(auditValues({ action: 'booking_hold', actorUserId: user.id, detail: { bookingId: id, tripId: trip.id, seats } })).returning('id'))
      .insertInto('outbox').values(outboxValues({ kind: 'booking-held', to: { email: user.email, name: user.name }, locale: user.locale, bookingId: id, tripId: trip.id, ...mail }))
      .execute()
  } catch (e) {
    const code = (e as { code?: string }).code
    if (code === '23502') return 'sold_out' // not_null_violation: the counter had no room
    if (code === '23505') return 'hold_exists' // unique_violation: bookings_one_hold
    throw e
  }
  return { id }
}
