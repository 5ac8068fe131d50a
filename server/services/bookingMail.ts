import type { Kysely, Transaction } from 'kysely'
import { localKindOf, type LocalKind } from '../../shared/safety/text'
import type { Database } from '../database/schema'
import { localReport } from '../eclipse/report'
import { dueOf } from './dues'
import { elementsInForce } from './eclipses'
import * as T from './mailTemplates'
import { enqueueMail } from './outbox'
import { businessDate, nowIso } from './clock'

type Db = Kysely<Database> | Transaction<Database>

/** What is seen at the trip's primary site, so a booking e-mail's safety text fits an annular trip too. */
export async function tripKind(db: Db, t: { eclipse_id: string; primary_site_id: number }): Promise<LocalKind> {
  const site = await db.selectFrom('sites').select(['lat', 'lon', 'elevation_m']).where('id', '=', t.primary_site_id).executeTakeFirstOrThrow()
  const { el, deltaTOverride } = await elementsInForce(db as Kysely<Database>, t.eclipse_id)
  return localKindOf(localReport(t.eclipse_id, el, { latDeg: site.lat, lonDeg: site.lon, elevationM: site.elevation_m }, deltaTOverride).type)
}

async function data(db: Db, bookingId: number, appUrl: string, known?: { kind: LocalKind }) {
  const b = await db.selectFrom('bookings').selectAll().where('id', '=', bookingId).executeTakeFirstOrThrow()
  const u = await db.selectFrom('users').select(['name', 'email', 'locale']).where('id', '=', b.user_id).executeTakeFirstOrThrow()
  const t = await db.selectFrom('trips').select(['id', 'title', 'balance_due_date', 'eclipse_id', 'primary_site_id']).where('id', '=', b.trip_id).executeTakeFirstOrThrow()
  return {
    b, u, t,
    d: {
      eclipseKind: known?.kind ?? await tripKind(db, t), name: u.name, tripTitle: t.title, seats: b.seats, currency: b.currency, priceMinor: b.price_minor, paidMinor: b.paid_minor, dueMinor: dueOf(b), bookingUrl: `${appUrl}/bookings/${b.id}`, locale: u.locale },
  }
}

/** `known.kind` may be worked out before the caller's transaction (holds keep their trip lock short). */
export async function mailBookingHeld(db: Db, bookingId: number, appUrl: string, known?: { kind: LocalKind }) {
  const { b, u, d } = await data(db, bookingId, appUrl, known)
  await enqueueMail(db, { kind: 'booking-held', to: { email: u.email, name: u.name }, locale: u.locale, bookingId, tripId: b.trip_id, ...T.bookingHeld({ ...d, holdExpiresAt: b.hold_expires_at!, depositMinor: b.deposit_minor }) })
}

export async function mailBookingConfirmed(db: Db, bookingId: number, appUrl: string) {
  const { b, u, t, d } = await data(db, bookingId, appUrl)
  await enqueueMail(db, { kind: 'booking-confirmed', to: { email: u.email, name: u.name }, locale: u.locale, bookingId, tripId: b.trip_id, ...T.bookingConfirmed({ ...d, balanceDueDate: t.balance_due_date }) })
}

export async function mailReceipt(db: Db, paymentId: number, appUrl: string) {
  const p = await db.selectFrom('payments').selectAll().where('id', '=', paymentId).executeTakeFirstOrThrow()
  const { b, u, d } = await data(db, p.booking_id, appUrl)
  await enqueueMail(db, { kind: 'payment-receipt', to: { email: u.email, name: u.name }, locale: u.locale, bookingId: b.id, tripId: b.trip_id, ...T.paymentReceipt({ ...d, amountMinor: p.amount_minor, kind: p.kind, reference: p.payment_intent_id, paidAt: p.completed_at ?? nowIso() }) })
}

export async function mailRefund(db: Db, bookingId: number, amountMinor: number, reason: string, appUrl: string) {
  const { b, u, d } = await data(db, bookingId, appUrl)
  await enqueueMail(db, { kind: 'refund-issued', to: { email: u.email, name: u.name }, locale: u.locale, bookingId, tripId: b.trip_id, ...T.refundIssued({ ...d, amountMinor, reason }) })
}

export async function mailWaitlistOffer(db: Db, waitlistId: number, appUrl: string) {
  const w = await db.selectFrom('waitlist').selectAll().where('id', '=', waitlistId).executeTakeFirstOrThrow()
  const u = await db.selectFrom('users').select(['name', 'email', 'locale']).where('id', '=', w.user_id).executeTakeFirstOrThrow()
  const t = await db.selectFrom('trips').select(['id', 'title']).where('id', '=', w.trip_id).executeTakeFirstOrThrow()
  await enqueueMail(db, { kind: 'waitlist-offer', to: { email: u.email, name: u.name }, locale: u.locale, tripId: t.id, ...T.waitlistOffer({ name: u.name, tripTitle: t.title, seats: w.seats, offerExpiresAt: w.offer_expires_at!, tripUrl: `${appUrl}/trips/${t.id}`, locale: u.locale }) })
}

/** Scheduled: a reminder 30 and 7 days before the balance is due, once each per booking. */
export async function queueBalanceReminders(db: Kysely<Database>, appUrl: string, today = new Date(`${businessDate()}T00:00:00Z`)) {
  const rows = await db.selectFrom('bookings').innerJoin('trips', 'trips.id', 'bookings.trip_id').select(['bookings.id', 'trips.balance_due_date'])
    .where('bookings.status', '=', 'confirmed').whereRef('bookings.paid_minor', '<', 'bookings.price_minor').execute()
  let queued = 0
  for (const r of rows) {
    const days = Math.ceil((Date.parse(`${r.balance_due_date}T00:00:00Z`) - today.getTime()) / 86_400_000)
    const threshold = days < 0 ? null : days <= 7 ? 7 : days <= 30 ? 30 : null
    if (threshold === null) continue
    await db.transaction().execute(async (trx) => {
      const { b, u, t, d } = await data(trx, r.id, appUrl)
      const before = await trx.selectFrom('outbox').select('id').where('dedupe_key', '=', `balance-${threshold}-${b.id}`).executeTakeFirst()
      if (before) return
      await enqueueMail(trx, { kind: 'balance-reminder', dedupeKey: `balance-${threshold}-${b.id}`, to: { email: u.email, name: u.name }, locale: u.locale, bookingId: b.id, tripId: b.trip_id, ...T.balanceReminder({ ...d, balanceDueDate: t.balance_due_date, daysBefore: threshold }) })
      queued++
    })
  }
  return queued
}
