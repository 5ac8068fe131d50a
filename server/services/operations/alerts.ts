import type { Kysely, Transaction } from 'kysely'
import type { Database, User } from '../../database/schema'
import type { AlertKind, AlertMode } from '../../database/tables/alerts'
import { formatMinor } from '../../../shared/money/minorUnits'
import { businessDate, nowIso } from '../clock'
import { enqueueMail } from '../outbox'
import { alertDigestMail, alertMail } from './operationsMail'

type Db = Kysely<Database> | Transaction<Database>

/**
 * Organisers' alerts. Each event of a trip (a new booking, a payment, a cancellation, a waitlist
 * entry) is written, in the event's own transaction, as one alert per organiser (every organiser
 * manages every trip), shown in the in-app list with read/unread. An organiser who chose "immediate"
 * gets a mail queued in that same transaction; one who chose "digest" gets the next business day's
 * digest instead (sendAlertDigests, from housekeeping).
 */
export type TripEvent =
  | { kind: 'booking'; bookingId: number }
  | { kind: 'payment'; paymentId: number }
  | { kind: 'cancellation'; bookingId: number; byOrganiser: boolean }
  | { kind: 'waitlist'; waitlistId: number }

export const DEFAULT_ALERT_MODE: AlertMode = 'immediate'

const seatWord = (n: number) => `${n} seat${n === 1 ? '' : 's'}`
/** The line of a new hold's alert (also written by the one-statement hold, holdStatement.ts). */
export const holdAlertSummary = (name: string, seats: number, bookingId: number) => `${name} holds ${seatWord(seats)} (booking #${bookingId})`

/** The event's trip, booking and one line saying what happened (plain text; escaped where mailed). */
async function describe(db: Db, e: TripEvent): Promise<{ tripId: number; bookingId: number | null; summary: string }> {
  const bookingOf = (id: number) => db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id', 'bookings.trip_id', 'bookings.seats', 'users.name']).where('bookings.id', '=', id).executeTakeFirstOrThrow()
  switch (e.kind) {
    case 'booking': {
      const b = await bookingOf(e.bookingId)
      return { tripId: b.trip_id, bookingId: b.id, summary: holdAlertSummary(b.name, b.seats, b.id) }
    }
    case 'payment': {
      const p = await db.selectFrom('payments').select(['booking_id', 'amount_minor', 'currency', 'kind']).where('id', '=', e.paymentId).executeTakeFirstOrThrow()
      const b = await bookingOf(p.booking_id)
      return { tripId: b.trip_id, bookingId: b.id, summary: `${b.name} paid ${formatMinor(p.amount_minor, p.currency)} (${p.kind}) on booking #${b.id}` }
    }
    case 'cancellation': {
      const b = await bookingOf(e.bookingId)
      return { tripId: b.trip_id, bookingId: b.id, summary: `Booking #${b.id} of ${b.name} (${seatWord(b.seats)}) was cancelled by ${e.byOrganiser ? 'an organiser' : 'the traveller'}` }
    }
    case 'waitlist': {
      const w = await db.selectFrom('waitlist').innerJoin('users', 'users.id', 'waitlist.user_id')
        .select(['waitlist.trip_id', 'waitlist.seats', 'users.name']).where('waitlist.id', '=', e.waitlistId).executeTakeFirstOrThrow()
      return { tripId: w.trip_id, bookingId: null, summary: `${w.name} joined the waitlist for ${seatWord(w.seats)}` }
    }
  }
}

/** Records the event for every organiser, inside the caller's transaction (see above). */
export async function alertOrganisers(trx: Db, e: TripEvent, appUrl: string): Promise<void> {
  const { tripId, bookingId, summary } = await describe(trx, e)
  const trip = await trx.selectFrom('trips').select(['title']).where('id', '=', tripId).executeTakeFirstOrThrow()
  const organisers = await trx.selectFrom('users').leftJoin('alert_preferences', 'alert_preferences.user_id', 'users.id')
    .select(['users.id', 'users.email', 'users.name', 'alert_preferences.mode']).where('users.role', '=', 'organiser').orderBy('users.id').execute()
  const at = nowIso()
  const day = businessDate()
  for (const o of organisers) {
    const delivery: AlertMode = o.mode ?? DEFAULT_ALERT_MODE
    await trx.insertInto('organiser_alerts').values({ user_id: o.id, trip_id: tripId, booking_id: bookingId, kind: e.kind, summary, business_date: day, delivery, created_at: at }).execute()
    if (delivery === 'immediate') {
      await enqueueMail(trx, { kind: 'organiser-alert', to: { email: o.email, name: o.name }, tripId, bookingId: bookingId ?? undefined, ...alertMail({ kind: e.kind, summary, tripTitle: trip.title, at, url: `${appUrl}/trips/${tripId}/manage` }) })
    }
  }
}

/** An organiser's alerts, newest first (at most `limit`), with the unread count and their mail choice. */
export async function listAlerts(db: Kysely<Database>, user: User, limit = 200) {
  const rows = await db.selectFrom('organiser_alerts').innerJoin('trips', 'trips.id', 'organiser_alerts.trip_id')
    .select(['organiser_alerts.id', 'organiser_alerts.kind', 'organiser_alerts.summary', 'organiser_alerts.trip_id', 'organiser_alerts.booking_id', 'organiser_alerts.created_at', 'organiser_alerts.read_at', 'organiser_alerts.delivery', 'organiser_alerts.digest_date', 'trips.title'])
    .where('organiser_alerts.user_id', '=', user.id).orderBy('organiser_alerts.id', 'desc').limit(limit).execute()
  const unread = await db.selectFrom('organiser_alerts').select((eb) => eb.fn.countAll<number>().as('n')).where('user_id', '=', user.id).where('read_at', 'is', null).executeTakeFirstOrThrow()
  return {
    data: rows.map((r) => ({
      id: r.id, kind: r.kind as AlertKind, summary: r.summary, tripId: r.trip_id, tripTitle: r.title, bookingId: r.booking_id, createdAt: r.created_at,
      read: r.read_at !== null, readAt: r.read_at, delivery: r.delivery, digestDate: r.digest_date,
    })),
    meta: { unread: Number(unread.n), mode: await alertMode(db, user.id) },
  }
}

export async function alertMode(db: Db, userId: number): Promise<AlertMode> {
  const p = await db.selectFrom('alert_preferences').select('mode').where('user_id', '=', userId).executeTakeFirst()
  return p?.mode ?? DEFAULT_ALERT_MODE
}

/** Sets the caller's choice; alerts already waiting for a digest still go in it. */
export async function setAlertMode(db: Kysely<Database>, user: User, mode: AlertMode) {
  await db.insertInto('alert_preferences').values({ user_id: user.id, mode, updated_at: nowIso() })
    .onConflict((oc) => oc.column('user_id').doUpdateSet({ mode, updated_at: nowIso() })).execute()
  return { mode }
}

/** Marks the caller's alerts read (some by id, or all); others' ids are ignored, never touched. */
export async function markAlertsRead(db: Kysely<Database>, user: User, which: { ids: number[] } | { all: true }) {
  let q = db.updateTable('organiser_alerts').set({ read_at: nowIso() }).where('user_id', '=', user.id).where('read_at', 'is', null)
  if ('ids' in which) q = q.where('id', 'in', which.ids)
  const r = await q.executeTakeFirst()
  return { marked: Number(r.numUpdatedRows) }
}

/**
 * The daily digests: for each organiser with alerts waiting from an earlier business day, one mail
 * for today's business date. The digest row (primary key: organiser and date), the alerts' stamp and
 * the outbox mail are one transaction, so a second instance, or a second tick, finds the row and
 * sends nothing: at most one digest per organiser per business day.
 */
export async function sendAlertDigests(db: Kysely<Database>, appUrl: string, today = businessDate()): Promise<number> {
  const waiting = await db.selectFrom('organiser_alerts').select('user_id').distinct()
    .where('delivery', '=', 'digest').where('digest_date', 'is', null).where('business_date', '<', today).execute()
  let sent = 0
  for (const { user_id: userId } of waiting) {
    const done = await db.transaction().execute(async (trx) => {
      const claimed = await trx.insertInto('alert_digests').values({ user_id: userId, business_date: today, alert_count: 0 })
        .onConflict((oc) => oc.columns(['user_id', 'business_date']).doNothing()).returning('user_id').executeTakeFirst()
      if (!claimed) return false
      const alerts = await trx.selectFrom('organiser_alerts').innerJoin('trips', 'trips.id', 'organiser_alerts.trip_id')
        .select(['organiser_alerts.id', 'organiser_alerts.kind', 'organiser_alerts.summary', 'organiser_alerts.created_at', 'trips.title'])
        .where('organiser_alerts.user_id', '=', userId).where('organiser_alerts.delivery', '=', 'digest').where('organiser_alerts.digest_date', 'is', null)
        .where('organiser_alerts.business_date', '<', today).orderBy('organiser_alerts.id').execute()
      if (!alerts.length) return false
      await trx.updateTable('organiser_alerts').set({ digest_date: today }).where('id', 'in', alerts.map((a) => a.id)).execute()
      await trx.updateTable('alert_digests').set({ alert_count: alerts.length }).where('user_id', '=', userId).where('business_date', '=', today).execute()
      const to = await trx.selectFrom('users').select(['email', 'name', 'role']).where('id', '=', userId).executeTakeFirstOrThrow()
      // Someone no longer an organiser is not mailed about trips; the alerts stay stamped, unsent.
      if (to.role !== 'organiser') return false
      await enqueueMail(trx, {
        kind: 'organiser-digest', to: { email: to.email, name: to.name }, dedupeKey: `alert-digest-${userId}-${today}`,
        ...alertDigestMail({ date: today, url: `${appUrl}/alerts`, lines: alerts.map((a) => ({ kind: a.kind, summary: a.summary, tripTitle: a.title, at: a.created_at })) }),
      })
      return true
    })
    if (done) sent++
  }
  return sent
}
