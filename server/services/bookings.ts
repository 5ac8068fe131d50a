import { randomUUID } from 'node:crypto'
import type { Kysely, Selectable, Transaction } from 'kysely'
import type Stripe from 'stripe'
import { refundPctOn } from '../../shared/schemas/trips'
import { businessDate } from './clock'
import type { BookingsTable, Database, User } from '../database/schema'
import { audit } from './audit'
import { mailBookingConfirmed, mailBookingHeld, mailReceipt, mailRefund, mailWaitlistOffer } from './bookingMail'
import { NotFoundError } from './planning'
import { getTripRow, seatUse, tiersOf } from './trips'

type Db = Kysely<Database> | Transaction<Database>
export type BookingRow = Selectable<BookingsTable>

export class SoldOutError extends Error {
  constructor(public available: number) { super(available === 0 ? 'This trip is sold out: join the waitlist' : `Only ${available} seats are left`) }
}
export class BookingStateError extends Error {}

const iso = (ms = Date.now()) => new Date(ms).toISOString()

export interface BookingConfig { holdMinutes: number; offerHours: number; appUrl: string }

/** Marks lapsed holds expired, expires stale waitlist offers, then offers freed seats to the waitlist. */
export async function releaseLapsed(trx: Db, tripId: number, cfg: BookingConfig): Promise<void> {
  const now = iso()
  await trx.updateTable('bookings').set({ status: 'expired', updated_at: now })
    .where('trip_id', '=', tripId).where('status', '=', 'held').where('hold_expires_at', '<=', now).execute()
  await trx.updateTable('waitlist').set({ status: 'expired' })
    .where('trip_id', '=', tripId).where('status', '=', 'offered').where('offer_expires_at', '<=', now).execute()
  await offerWaitlist(trx, tripId, cfg)
}

/** Offers free seats to the waitlist, first come first served, each offer for a limited time. */
export async function offerWaitlist(trx: Db, tripId: number, cfg: BookingConfig): Promise<number[]> {
  const trip = await trx.selectFrom('trips').select('seats').where('id', '=', tripId).executeTakeFirstOrThrow()
  const use = await seatUse(trx as Kysely<Database>, tripId)
  let free = trip.seats - use.taken - use.offered
  const offered: number[] = []
  if (free <= 0) return offered
  const waiting = await trx.selectFrom('waitlist').selectAll().where('trip_id', '=', tripId).where('status', '=', 'waiting').orderBy('id').execute()
  for (const w of waiting) {
    if (w.seats > free) continue
    await trx.updateTable('waitlist').set({ status: 'offered', offer_expires_at: iso(Date.now() + cfg.offerHours * 3600_000) }).where('id', '=', w.id).execute()
    await mailWaitlistOffer(trx, w.id, cfg.appUrl)
    free -= w.seats
    offered.push(w.id)
  }
  return offered
}

/** Holds seats for 15 minutes (or the configured hold), atomically. */
export async function createHold(db: Kysely<Database>, user: User, tripId: number, seats: number, cfg: BookingConfig) {
  return db.transaction().execute(async (trx) => {
    const trip = await trx.selectFrom('trips').selectAll().where('id', '=', tripId).executeTakeFirst()
    if (!trip || trip.status !== 'published') throw new NotFoundError('No such trip')
    await releaseLapsed(trx, tripId, cfg)
    const now = iso()
    const use = await seatUse(trx as unknown as Kysely<Database>, tripId, now, user.id)
    const available = trip.seats - use.taken - use.offered
    if (seats > available) throw new SoldOutError(Math.max(0, available))
    const holdExpiresAt = iso(Date.now() + cfg.holdMinutes * 60_000)
    const b = await trx.insertInto('bookings').values({
      trip_id: tripId, user_id: user.id, seats, status: 'held', hold_expires_at: holdExpiresAt,
      price_minor: seats * trip.price_minor, deposit_minor: seats * trip.deposit_minor, currency: trip.currency,
    }).returning('id').executeTakeFirstOrThrow()
    await trx.updateTable('waitlist').set({ status: 'accepted', booking_id: b.id })
      .where('trip_id', '=', tripId).where('user_id', '=', user.id).where('status', '=', 'offered').execute()
    await audit(trx, { action: 'booking_hold', actorUserId: user.id, detail: { bookingId: b.id, tripId, seats } })
    await mailBookingHeld(trx, b.id, cfg.appUrl)
    return { id: b.id, status: 'held' as const, holdExpiresAt }
  })
}

export async function joinWaitlist(db: Kysely<Database>, user: User, tripId: number, seats: number, cfg: BookingConfig) {
  return db.transaction().execute(async (trx) => {
    const trip = await trx.selectFrom('trips').selectAll().where('id', '=', tripId).executeTakeFirst()
    if (!trip || trip.status !== 'published') throw new NotFoundError('No such trip')
    await releaseLapsed(trx, tripId, cfg)
    const use = await seatUse(trx as unknown as Kysely<Database>, tripId, iso(), user.id)
    if (trip.seats - use.taken - use.offered >= seats) throw new BookingStateError('Seats are available: book them instead')
    const w = await trx.insertInto('waitlist').values({ trip_id: tripId, user_id: user.id, seats, status: 'waiting' }).returning('id').executeTakeFirstOrThrow()
    const position = await trx.selectFrom('waitlist').select((eb) => eb.fn.countAll<number>().as('n'))
      .where('trip_id', '=', tripId).where('status', '=', 'waiting').where('id', '<=', w.id).executeTakeFirstOrThrow()
    return { id: w.id, status: 'waiting' as const, position: Number(position.n) }
  })
}

/** The booking, if the caller may see it: their own, or any for organisers. Someone else's is a 404. */
export async function bookingFor(db: Db, user: User, id: number): Promise<BookingRow> {
  const b = await db.selectFrom('bookings').selectAll().where('id', '=', id).executeTakeFirst()
  if (!b || (b.user_id !== user.id && user.role !== 'organiser')) throw new NotFoundError('No such booking')
  return b
}

export function dueOf(b: BookingRow): number {
  if (b.status === 'cancelled' || b.status === 'expired') return 0
  const target = b.status === 'held' ? b.deposit_minor : b.price_minor
  return Math.max(0, target - b.paid_minor)
}

export async function bookingView(db: Db, b: BookingRow) {
  const trip = await db.selectFrom('trips').select(['id', 'title', 'eclipse_id', 'start_date', 'balance_due_date', 'cancellation_tiers']).where('id', '=', b.trip_id).executeTakeFirstOrThrow()
  const payments = await db.selectFrom('payments').selectAll().where('booking_id', '=', b.id).orderBy('id').execute()
  const refunds = await db.selectFrom('refunds').selectAll().where('booking_id', '=', b.id).orderBy('id').execute()
  return {
    id: b.id, tripId: b.trip_id, trip: { id: trip.id, title: trip.title, eclipseId: trip.eclipse_id, startDate: trip.start_date, balanceDueDate: trip.balance_due_date },
    seats: b.seats, status: b.status, holdExpiresAt: b.status === 'held' ? b.hold_expires_at : null,
    priceMinor: b.price_minor, depositMinor: b.deposit_minor, paidMinor: b.paid_minor, refundedMinor: b.refunded_minor,
    dueMinor: dueOf(b), balanceMinor: Math.max(0, b.price_minor - b.paid_minor), currency: b.currency,
    refundPctToday: refundPctOn(JSON.parse(trip.cancellation_tiers), businessDate()),
    receipts: payments.filter((p) => p.status === 'succeeded').map((p) => ({ id: p.id, kind: p.kind, amountMinor: p.amount_minor, currency: p.currency, paidAt: p.completed_at, reference: p.payment_intent_id, demo: !!p.demo })),
    payments: payments.map((p) => ({ id: p.id, kind: p.kind, amountMinor: p.amount_minor, status: p.status, createdAt: p.created_at })),
    refunds: refunds.map((r) => ({ id: r.id, amountMinor: r.amount_minor, status: r.status, reason: r.reason, createdAt: r.created_at, reference: r.stripe_refund_id })),
    cancelReason: b.cancel_reason,
  }
}

async function customerFor(db: Kysely<Database>, stripe: Stripe, user: User): Promise<string> {
  const row = await db.selectFrom('stripe_customers').select('customer_id').where('user_id', '=', user.id).executeTakeFirst()
  if (row) return row.customer_id
  const c = await stripe.customers.create({ email: user.email, name: user.name, metadata: { userId: String(user.id) } }, { idempotencyKey: `customer-${randomUUID()}` })
  await db.insertInto('stripe_customers').values({ user_id: user.id, customer_id: c.id }).onConflict((oc) => oc.column('user_id').doNothing()).execute()
  return c.id
}

/** Starts a Stripe Checkout Session for the deposit (held booking) or the balance (confirmed booking). */
export async function startCheckout(db: Kysely<Database>, stripe: Stripe, user: User, bookingId: number, cfg: BookingConfig) {
  const b = await bookingFor(db, user, bookingId)
  if (b.user_id !== user.id) throw new NotFoundError('No such booking')
  let kind: 'deposit' | 'balance'
  let amount: number
  if (b.status === 'held') {
    if (!b.hold_expires_at || b.hold_expires_at <= iso()) throw new BookingStateError('This hold has lapsed: book again')
    kind = 'deposit'
    amount = b.deposit_minor - b.paid_minor
  } else if (b.status === 'confirmed' && b.price_minor > b.paid_minor) {
    kind = 'balance'
    amount = b.price_minor - b.paid_minor
  } else {
    throw new BookingStateError('Nothing is due on this booking')
  }
  if (amount <= 0) throw new BookingStateError('Nothing is due on this booking')
  const trip = await getTripRow(db, b.trip_id)
  const payment = await db.insertInto('payments').values({ booking_id: b.id, kind, amount_minor: amount, currency: b.currency, status: 'pending', checkout_session_id: null, payment_intent_id: null, completed_at: null, idem_key: randomUUID() })
    .returning(['id', 'idem_key']).executeTakeFirstOrThrow()
  const metadata = { bookingId: String(b.id), paymentId: String(payment.id), kind }
  try {
    const session = await stripe.checkout.sessions.create({
      mode: 'payment',
      customer: await customerFor(db, stripe, user),
      client_reference_id: String(b.id),
      line_items: [{ quantity: 1, price_data: { currency: b.currency, unit_amount: amount, product_data: { name: `${trip.title} — ${kind} for ${b.seats} seat${b.seats > 1 ? 's' : ''}` } } }],
      metadata,
      payment_intent_data: { metadata },
      success_url: `${cfg.appUrl}/bookings/${b.id}?paid=1`,
      cancel_url: `${cfg.appUrl}/bookings/${b.id}?cancelled=1`,
    }, { idempotencyKey: `checkout-${payment.idem_key}` })
    await db.updateTable('payments').set({ checkout_session_id: session.id }).where('id', '=', payment.id).execute()
    return { url: session.url!, paymentId: payment.id, kind, amountMinor: amount }
  } catch (e) {
    await db.updateTable('payments').set({ status: 'failed' }).where('id', '=', payment.id).execute()
    throw e
  }
}

/**
 * Records a successful payment exactly once (by payment id and status) and confirms the booking.
 * If a lapsed hold's seats were taken meanwhile, the money goes back: returns the refund to make.
 */
export async function completePayment(trx: Transaction<Database>, paymentId: number, paymentIntentId: string | null, cfg: BookingConfig): Promise<{ refund?: { bookingId: number; paymentId: number; intent: string; amount: number } }> {
  const p = await trx.selectFrom('payments').selectAll().where('id', '=', paymentId).executeTakeFirst()
  if (!p || p.status === 'succeeded') return {}
  await trx.updateTable('payments').set({ status: 'succeeded', payment_intent_id: paymentIntentId, completed_at: iso() }).where('id', '=', p.id).execute()
  const b = await trx.selectFrom('bookings').selectAll().where('id', '=', p.booking_id).executeTakeFirstOrThrow()
  const paid = b.paid_minor + p.amount_minor
  if (b.status === 'held' || b.status === 'expired') {
    const trip = await trx.selectFrom('trips').select('seats').where('id', '=', b.trip_id).executeTakeFirstOrThrow()
    const use = await seatUse(trx as unknown as Kysely<Database>, b.trip_id, iso(), b.user_id)
    const mine = b.status === 'held' && b.hold_expires_at! > iso() ? b.seats : 0
    if (trip.seats - (use.taken - mine) - use.offered >= b.seats) {
      await trx.updateTable('bookings').set({ status: 'confirmed', paid_minor: paid, hold_expires_at: null, updated_at: iso() }).where('id', '=', b.id).execute()
      await audit(trx, { action: 'booking_confirmed', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id, amountMinor: p.amount_minor } })
      await mailBookingConfirmed(trx, b.id, cfg.appUrl)
      await mailReceipt(trx, p.id, cfg.appUrl)
      return {}
    }
    // Paid after the hold lapsed and the seats went to someone else: give the money back.
    await trx.updateTable('bookings').set({ status: 'cancelled', paid_minor: paid, cancel_reason: 'paid after the hold lapsed; seats no longer available', updated_at: iso() }).where('id', '=', b.id).execute()
    await audit(trx, { action: 'booking_paid_too_late', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id } })
    return { refund: paymentIntentId ? { bookingId: b.id, paymentId: p.id, intent: paymentIntentId, amount: p.amount_minor } : undefined }
  }
  await trx.updateTable('bookings').set({ paid_minor: paid, updated_at: iso() }).where('id', '=', b.id).execute()
  await audit(trx, { action: 'payment_received', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id, amountMinor: p.amount_minor, kind: p.kind } })
  await mailReceipt(trx, p.id, cfg.appUrl)
  return {}
}

/** Sends a refund through Stripe for an already-recorded refund row; marks it succeeded or failed. */
async function sendRefund(db: Kysely<Database>, stripe: Stripe, refundId: number, intent: string, amount: number) {
  try {
    const row = await db.selectFrom('refunds').select('idem_key').where('id', '=', refundId).executeTakeFirstOrThrow()
    const r = await stripe.refunds.create({ payment_intent: intent, amount, metadata: { refundId: String(refundId) } }, { idempotencyKey: `refund-${row.idem_key}` })
    await db.updateTable('refunds').set({ status: 'succeeded', stripe_refund_id: r.id }).where('id', '=', refundId).execute()
  } catch (e) {
    await db.updateTable('refunds').set({ status: 'failed', error: (e as Error).message }).where('id', '=', refundId).execute()
  }
}

/** Handles one verified Stripe event; replays of the same event id change nothing. */
export async function handleStripeEvent(db: Kysely<Database>, stripe: Stripe, event: Stripe.Event, cfg: BookingConfig) {
  const result = await db.transaction().execute(async (trx) => {
    const fresh = await trx.insertInto('stripe_events').values({ id: event.id, type: event.type }).onConflict((oc) => oc.column('id').doNothing()).executeTakeFirst()
    if (!fresh.numInsertedOrUpdatedRows) return { duplicate: true as const }
    const obj = event.data.object as { metadata?: Record<string, string>; payment_status?: string; payment_intent?: string | null; id: string }
    const paymentId = Number(obj.metadata?.paymentId)
    if (!paymentId) return { ignored: true as const }
    if (event.type === 'checkout.session.completed' && obj.payment_status === 'paid') {
      return completePayment(trx, paymentId, typeof obj.payment_intent === 'string' ? obj.payment_intent : null, cfg)
    }
    if (event.type === 'payment_intent.succeeded') return completePayment(trx, paymentId, obj.id, cfg)
    if (event.type === 'checkout.session.expired' || event.type === 'checkout.session.async_payment_failed') {
      await trx.updateTable('payments').set({ status: 'failed' }).where('id', '=', paymentId).where('status', '=', 'pending').execute()
    }
    return {}
  })
  if ('refund' in result && result.refund) await refundLatePayment(db, stripe, result.refund, cfg.appUrl)
  return result
}

async function refundLatePayment(db: Kysely<Database>, stripe: Stripe, r: { bookingId: number; paymentId: number; intent: string; amount: number }, appUrl: string) {
  const row = await db.transaction().execute(async (trx) => {
    const rr = await trx.insertInto('refunds').values({ booking_id: r.bookingId, payment_id: r.paymentId, amount_minor: r.amount, reason: 'automatic: paid after the hold lapsed', status: 'pending', stripe_refund_id: null, error: null, created_by: null, idem_key: randomUUID() })
      .returning('id').executeTakeFirstOrThrow()
    await trx.updateTable('bookings').set((eb) => ({ refunded_minor: eb('refunded_minor', '+', r.amount) })).where('id', '=', r.bookingId).execute()
    await mailRefund(trx, r.bookingId, r.amount, 'automatic: paid after the hold lapsed', appUrl)
    return rr
  })
  await sendRefund(db, stripe, row.id, r.intent, r.amount)
}

/**
 * Refunds `amount` across the booking's card payments (newest first) and records each part.
 * Demo-seeded payments (no card) are recorded as refunded without a Stripe call.
 */
async function refundAcrossPayments(db: Kysely<Database>, stripe: Stripe, bookingId: number, amount: number, reason: string, actorId: number | null, appUrl: string) {
  const payments = await db.selectFrom('payments').selectAll().where('booking_id', '=', bookingId).where('status', '=', 'succeeded').orderBy('id', 'desc').execute()
  const refunded = await db.selectFrom('refunds').select(['payment_id', 'amount_minor']).where('booking_id', '=', bookingId).where('status', '!=', 'failed').execute()
  let left = amount
  const parts: Array<{ id: number; intent: string | null; amount: number }> = []
  await db.transaction().execute(async (trx) => {
    for (const p of payments) {
      if (left <= 0) break
      const already = refunded.filter((r) => r.payment_id === p.id).reduce((s, r) => s + r.amount_minor, 0)
      const part = Math.min(left, p.amount_minor - already)
      if (part <= 0) continue
      const r = await trx.insertInto('refunds').values({ booking_id: bookingId, payment_id: p.id, amount_minor: part, reason, status: p.payment_intent_id ? 'pending' : 'succeeded', stripe_refund_id: p.payment_intent_id ? null : 'demo-no-card', error: null, created_by: actorId, idem_key: randomUUID() })
        .returning('id').executeTakeFirstOrThrow()
      parts.push({ id: r.id, intent: p.payment_intent_id, amount: part })
      left -= part
    }
    await trx.updateTable('bookings').set((eb) => ({ refunded_minor: eb('refunded_minor', '+', amount - left), updated_at: iso() })).where('id', '=', bookingId).execute()
    if (amount - left > 0) await mailRefund(trx, bookingId, amount - left, reason, appUrl)
  })
  for (const p of parts) if (p.intent) await sendRefund(db, stripe, p.id, p.intent, p.amount)
  return amount - left
}

/** Cancels a booking; refunds follow the trip's tiers on today's date. */
export async function cancelBooking(db: Kysely<Database>, stripe: Stripe | null, user: User, bookingId: number, cfg: BookingConfig) {
  const b = await bookingFor(db, user, bookingId)
  if (b.status !== 'held' && b.status !== 'confirmed') throw new BookingStateError(`This booking is already ${b.status}`)
  const trip = await getTripRow(db, b.trip_id)
  const pct = b.status === 'confirmed' ? refundPctOn(tiersOf(trip), businessDate()) : 0
  const refundMinor = Math.round(((b.paid_minor - b.refunded_minor) * pct) / 100)
  await db.transaction().execute(async (trx) => {
    const changed = await trx.updateTable('bookings').set({ status: 'cancelled', cancel_reason: `cancelled by ${user.id === b.user_id ? 'the traveller' : 'an organiser'}`, updated_at: iso() })
      .where('id', '=', b.id).where('status', 'in', ['held', 'confirmed']).executeTakeFirst()
    if (!changed.numUpdatedRows) throw new BookingStateError('This booking changed meanwhile; reload and try again')
    await audit(trx, { action: 'booking_cancel', actorUserId: user.id, subjectUserId: b.user_id, detail: { bookingId: b.id, refundPct: pct, refundMinor } })
    await offerWaitlist(trx, b.trip_id, cfg)
  })
  let sent = 0
  if (refundMinor > 0) sent = await refundAcrossPayments(db, stripe!, b.id, refundMinor, `cancellation, ${pct}% tier`, user.id, cfg.appUrl)
  return { id: b.id, status: 'cancelled' as const, refundPct: pct, refundMinor: sent }
}

/** An organiser's manual refund with a reason, written to the audit log. */
export async function manualRefund(db: Kysely<Database>, stripe: Stripe, organiser: User, bookingId: number, amount: number, reason: string, cfg: BookingConfig) {
  const b = await bookingFor(db, organiser, bookingId)
  if (amount > b.paid_minor - b.refunded_minor) throw new BookingStateError(`At most ${b.paid_minor - b.refunded_minor} can be refunded`)
  const sent = await refundAcrossPayments(db, stripe, b.id, amount, `manual: ${reason}`, organiser.id, cfg.appUrl)
  await audit(db, { action: 'manual_refund', actorUserId: organiser.id, subjectUserId: b.user_id, detail: { bookingId: b.id, amountMinor: sent, reason } })
  return { refundMinor: sent }
}

/**
 * Reconciliation after a crash or a lost webhook: asks Stripe about pending checkouts and
 * completes the ones that were paid. Idempotent with the webhook path.
 */
export async function reconcilePayments(db: Kysely<Database>, stripe: Stripe, cfg: BookingConfig, olderThanMs = Number(process.env.UMBRAFIELD_RECONCILE_AFTER_MS || 30_000)): Promise<number> {
  const pending = await db.selectFrom('payments').select(['id', 'checkout_session_id']).where('status', '=', 'pending')
    .where('checkout_session_id', 'is not', null).where('created_at', '<', iso(Date.now() - olderThanMs)).execute()
  let completed = 0
  for (const p of pending) {
    const s = await stripe.checkout.sessions.retrieve(p.checkout_session_id!)
    if (s.payment_status !== 'paid') {
      if (s.status === 'expired') await db.updateTable('payments').set({ status: 'failed' }).where('id', '=', p.id).where('status', '=', 'pending').execute()
      continue
    }
    const r = await db.transaction().execute((trx) => completePayment(trx, p.id, typeof s.payment_intent === 'string' ? s.payment_intent : null, cfg))
    if (r.refund) await refundLatePayment(db, stripe, r.refund, cfg.appUrl)
    completed++
  }
  return completed
}

/** Periodic housekeeping for every trip: lapsed holds and offers. */
export async function housekeeping(db: Kysely<Database>, cfg: BookingConfig) {
  const trips = await db.selectFrom('trips').select('id').where('status', '=', 'published').execute()
  for (const t of trips) await db.transaction().execute((trx) => releaseLapsed(trx, t.id, cfg))
}
