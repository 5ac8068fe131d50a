import type { Kysely } from 'kysely'
import type { Database, User } from '../database/schema'
import { toSafeCsv } from './csv'
import { dueOf } from './dues'
import { assertStaffReach, getTripRow, seatUse } from './trips'

/** Organiser's table: every booking with payer, status, paid and due, plus the waitlist. */
export async function tripBookings(db: Kysely<Database>, tripId: number) {
  const trip = await getTripRow(db, tripId)
  const rows = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id', 'bookings.seats', 'bookings.status', 'bookings.hold_expires_at', 'bookings.price_minor', 'bookings.deposit_minor', 'bookings.paid_minor', 'bookings.refunded_minor', 'bookings.currency', 'bookings.created_at', 'bookings.trip_id', 'bookings.user_id', 'bookings.updated_at', 'bookings.cancel_reason', 'users.name', 'users.email'])
    .where('bookings.trip_id', '=', tripId).orderBy('bookings.id').execute()
  const waitlist = await db.selectFrom('waitlist').innerJoin('users', 'users.id', 'waitlist.user_id')
    .select(['waitlist.id', 'waitlist.seats', 'waitlist.status', 'waitlist.offer_expires_at', 'waitlist.created_at', 'users.name', 'users.email'])
    .where('waitlist.trip_id', '=', tripId).where('waitlist.status', 'in', ['waiting', 'offered']).orderBy('waitlist.id').execute()
  const use = await seatUse(db, tripId)
  return {
    trip: { id: trip.id, title: trip.title, seats: trip.seats, seatsLeft: Math.max(0, trip.seats - use.taken - use.offered), currency: trip.currency, status: trip.status },
    data: rows.map((b) => ({
      id: b.id, name: b.name, email: b.email, seats: b.seats, status: b.status, holdExpiresAt: b.hold_expires_at,
      priceMinor: b.price_minor, paidMinor: b.paid_minor, refundedMinor: b.refunded_minor,
      dueMinor: dueOf(b as never), balanceMinor: b.status === 'confirmed' ? Math.max(0, b.price_minor - b.paid_minor) : 0,
      currency: b.currency, createdAt: b.created_at,
    })),
    waitlist: waitlist.map((w, i) => ({ id: w.id, position: i + 1, name: w.name, email: w.email, seats: w.seats, status: w.status, offerExpiresAt: w.offer_expires_at })),
  }
}

export async function tripBookingsCsv(db: Kysely<Database>, tripId: number): Promise<string> {
  const t = await tripBookings(db, tripId)
  return toSafeCsv(t.data.map((b) => ({
    booking_id: b.id, name: b.name, email: b.email, seats: b.seats, status: b.status, currency: b.currency,
    price_minor: b.priceMinor, paid_minor: b.paidMinor, refunded_minor: b.refundedMinor, due_now_minor: b.dueMinor, balance_minor: b.balanceMinor, created_at: b.createdAt,
  }))) // traveller names like "=HYPERLINK(…)" stay text in a spreadsheet
}

/** Names and seats of confirmed participants, for organisers and the trip's own guides. */
export async function participants(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  await assertStaffReach(db, user, trip)
  const rows = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id').select(['users.name', 'bookings.seats'])
    .where('bookings.trip_id', '=', tripId).where('bookings.status', '=', 'confirmed').orderBy('users.name').execute()
  return { trip: { id: trip.id, title: trip.title }, data: rows.map((r) => ({ name: r.name, seats: r.seats })), meta: { total: rows.reduce((s, r) => s + r.seats, 0) } }
}
