import { sql, type Kysely, type Selectable } from 'kysely'
import type { LocalKind } from '../../shared/safety/text'
import type { Database, TripsTable, User } from '../database/schema'
import { auditValues } from './audit'
import { businessDate, nowIso } from './clock'
import * as T from './mailTemplates'
import { DEFAULT_ALERT_MODE, holdAlertSummary } from './operations/alerts'
import { alertMail } from './operations/operationsMail'
import { outboxValues } from './outbox'

/**
 * A hold as ONE statement (PostgreSQL): the seat counter's conditional UPDATE … RETURNING, the
 * booking, its audit row, its e-mail, and the organisers' alerts (one per organiser, with the mail of
 * those who chose "immediate"), written together by data-modifying CTEs, outside any explicit
 * transaction. The counter row is locked only while that statement runs, never across a round trip
 * to the app, so holds of one trip do not queue behind each other's commits, and the whole hold is
 * one round trip to the database.
 *
 * The booking takes its trip id from the counter's RETURNING: with no seats left the UPDATE returns
 * no row, the booking's trip_id is NULL, and the NOT NULL constraint fails the whole statement,
 * which then changes nothing. A second active hold of the same traveller on the trip fails the
 * partial unique index bookings_one_hold (migration 0022) the same way.
 *
 * `id` is the booking's id, drawn from the bookings sequence beforehand (createHold reads it with the
 * trip), so the e-mails can link to it.
 */
export async function holdInOneStatement(db: Kysely<Database>, a: {
  id: number; user: User; trip: Selectable<TripsTable>; seats: number; holdExpiresAt: string; kind?: LocalKind; appUrl: string
}): Promise<{ id: number } | 'sold_out' | 'hold_exists'> {
  const { id, user, trip, seats } = a
  const priceMinor = seats * trip.price_minor
  const depositMinor = seats * trip.deposit_minor
  const mail = T.bookingHeld({
    name: user.name, tripTitle: trip.title, seats, currency: trip.currency, priceMinor, paidMinor: 0, dueMinor: depositMinor,
    bookingUrl: `${a.appUrl}/bookings/${id}`, eclipseKind: a.kind, holdExpiresAt: a.holdExpiresAt, depositMinor, locale: user.locale,
  })
  // The organisers' alert, as alertOrganisers writes it: the same line and mail for every organiser.
  const at = nowIso()
  const summary = holdAlertSummary(user.name, seats, id)
  const alert = alertMail({ kind: 'booking', summary, tripTitle: trip.title, at, url: `${a.appUrl}/trips/${trip.id}/manage` })
  const delivery = sql<'immediate' | 'digest'>`coalesce(alert_preferences.mode, ${DEFAULT_ALERT_MODE})`
  const organiserMail = outboxValues({ kind: 'organiser-alert', to: { email: '', name: '' }, tripId: trip.id, bookingId: id, ...alert })
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
      .with('o', (w) => w.insertInto('organiser_alerts')
        .columns(['user_id', 'trip_id', 'booking_id', 'kind', 'summary', 'business_date', 'delivery', 'created_at'])
        .expression((eb) => eb.selectFrom('users').leftJoin('alert_preferences', 'alert_preferences.user_id', 'users.id')
          .select(['users.id', sql<number>`${trip.id}`.as('trip_id'), sql<number>`${id}`.as('booking_id'), sql<string>`${'booking'}`.as('kind'),
            sql<string>`${summary}`.as('summary'), sql<string>`${businessDate()}`.as('business_date'), delivery.as('delivery'), sql<string>`${at}`.as('created_at')])
          .where('users.role', '=', 'organiser'))
        .returning('id'))
      .with('om', (w) => w.insertInto('outbox')
        .columns(['message_id', 'kind', 'to_email', 'to_name', 'subject', 'html', 'text', 'attachments', 'next_attempt_at', 'booking_id', 'trip_id'])
        .expression((eb) => eb.selectFrom('users').leftJoin('alert_preferences', 'alert_preferences.user_id', 'users.id')
          // Each message its own Message-ID (outboxValues' form: <uuid@umbrafield>).
          .select([sql<string>`'<' || gen_random_uuid()::text || '@umbrafield>'`.as('message_id'), sql<string>`${organiserMail.kind}`.as('kind'),
            'users.email', 'users.name', sql<string>`${organiserMail.subject}`.as('subject'), sql<string>`${organiserMail.html}`.as('html'),
            sql<string>`${organiserMail.text}`.as('text'), sql<string>`${organiserMail.attachments}`.as('attachments'),
            sql<string>`${organiserMail.next_attempt_at}`.as('next_attempt_at'), sql<number>`${id}`.as('booking_id'), sql<number>`${trip.id}`.as('trip_id')])
          .where('users.role', '=', 'organiser').where(delivery, '=', 'immediate'))
        .returning('id'))
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
