import { randomUUID } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import type Stripe from 'stripe'
import { isPostgres } from '../database/dialect'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { mailBookingConfirmed, mailReceipt, mailRefund } from './bookingMail'
import { dueOf, type BookingRow } from './dues'
import { refundStuckMail } from './mailTemplates'
import { alertOrganisers } from './operations/alerts'
import { enqueueMail } from './outbox'
import { NotFoundError } from './planning'
import { claimSeats } from './seatCounter'
import { getTripRow, lockTripRow } from './trips'
import { nowMs } from './clock'

/**
 * Money that always adds up.
 *
 * - A booking has at most one open Checkout Session: an open one is reused, a stale one expired.
 * - A payment that arrives for a cancelled or expired booking, or beyond what is due, is refunded in
 *   full through a durable refund row written in the same transaction as the payment it answers.
 *   Such stray money never counts towards the booking: bookings.paid_minor is what was applied, and
 *   bookings.refunded_minor what was given back of it. The ledger (payments and refunds) holds all.
 * - A refund row is written (limits checked) in one transaction; it counts in the booking's totals,
 *   and the traveller hears of it, only once Stripe reports it succeeded. Housekeeping retries
 *   pending and failed refunds with backoff, and tells the organiser when one keeps failing.
 * - Reconciliation compares each booking's ledger with what Stripe holds, per payment, in bounded batches.
 */

type Db = Kysely<Database> | Transaction<Database>
const iso = (ms = nowMs()) => new Date(ms).toISOString()

export class BookingStateError extends Error {}
export class RefundLimitError extends Error {}
/** A checkout on the booking is already paid at Stripe but not yet applied here: the booking may not change now. */
export class CheckoutPendingError extends Error {
  constructor() { super('A payment on this booking has just gone through: wait a moment, reload, then try again') }
}

export interface MoneyConfig { holdMinutes: number; offerHours: number; appUrl: string }

/** Backoff for refund retries: base × 2^(attempts−1), capped at six hours. Base 30 s (UMBRAFIELD_REFUND_RETRY_MS in tests). */
function retryDelayMs(attempts: number): number {
  const base = Number(process.env.UMBRAFIELD_REFUND_RETRY_MS || 30_000)
  return Math.min(6 * 3600_000, base * 2 ** Math.max(0, attempts - 1))
}
/** After this many failed attempts the trip's organiser is told, once. */
export const REFUND_ALERT_AFTER = 3

async function customerFor(db: Kysely<Database>, stripe: Stripe, user: User): Promise<string> {
  const row = await db.selectFrom('stripe_customers').select('customer_id').where('user_id', '=', user.id).executeTakeFirst()
  if (row) return row.customer_id
  const c = await stripe.customers.create({ email: user.email, name: user.name, metadata: { userId: String(user.id) } }, { idempotencyKey: `customer-${randomUUID()}` })
  await db.insertInto('stripe_customers').values({ user_id: user.id, customer_id: c.id }).onConflict((oc) => oc.column('user_id').doNothing()).execute()
  return c.id
}

/**
 * The checkout for what is due now (deposit on a held booking, balance on a confirmed one).
 * An open session for the same amount is reused; any other open session is expired first, so a
 * booking never has two payable sessions.
 */
export async function startCheckout(db: Kysely<Database>, stripe: Stripe, user: User, bookingId: number, cfg: MoneyConfig) {
  const b = await db.selectFrom('bookings').selectAll().where('id', '=', bookingId).where('user_id', '=', user.id).executeTakeFirst()
  if (!b) throw new NotFoundError('No such booking')
  let kind: 'deposit' | 'balance'
  if (b.status === 'held') {
    if (!b.hold_expires_at || b.hold_expires_at <= iso()) throw new BookingStateError('This hold has lapsed: book again')
    kind = 'deposit'
  } else if (b.status === 'confirmed') {
    kind = 'balance'
  } else {
    throw new BookingStateError('Nothing is due on this booking')
  }
  const amount = dueOf(b)
  if (amount <= 0) throw new BookingStateError('Nothing is due on this booking')
  const open = await db.selectFrom('payments').selectAll().where('booking_id', '=', b.id).where('status', '=', 'pending')
    .where('checkout_session_id', 'is not', null).orderBy('id', 'desc').execute()
  for (const p of open) {
    const s = await stripe.checkout.sessions.retrieve(p.checkout_session_id!)
    if (s.status === 'open' && p.kind === kind && p.amount_minor === amount && s.url) return { url: s.url, paymentId: p.id, kind, amountMinor: amount, reused: true }
    if (s.status === 'open') await stripe.checkout.sessions.expire(s.id)
    if (s.status === 'complete' && s.payment_status === 'paid') {
      // Paid while we were not listening: record it now (idempotent with the webhook), then ask again.
      await db.transaction().execute((trx) => completePayment(trx, p.id, typeof s.payment_intent === 'string' ? s.payment_intent : null, cfg))
      throw new BookingStateError('A payment on this booking has just completed: reload the page')
    }
    await db.updateTable('payments').set({ status: 'failed', note: s.status === 'open' ? 'superseded by a new checkout' : `checkout ${s.status}` })
      .where('id', '=', p.id).where('status', '=', 'pending').execute()
  }
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
    return { url: session.url!, paymentId: payment.id, kind, amountMinor: amount, reused: false }
  } catch (e) {
    await db.updateTable('payments').set({ status: 'failed', note: 'checkout could not be created' }).where('id', '=', payment.id).execute()
    throw e
  }
}

/** Expires a booking's open checkouts at Stripe (best effort: a payment that still lands is refunded as stray). */
export async function expireOpenCheckouts(db: Kysely<Database>, stripe: Stripe | null, bookingId: number, why: string) {
  const open = await db.selectFrom('payments').select(['id', 'checkout_session_id']).where('booking_id', '=', bookingId)
    .where('status', '=', 'pending').where('checkout_session_id', 'is not', null).execute()
  for (const p of open) {
    await db.updateTable('payments').set({ status: 'failed', note: why }).where('id', '=', p.id).where('status', '=', 'pending').execute()
    if (stripe) {
      try { await stripe.checkout.sessions.expire(p.checkout_session_id!) } catch { /* already complete or expired: the webhook or reconciliation sees it */ }
    }
  }
}

async function sessionStatusAfterExpiry(stripe: Stripe, sessionId: string): Promise<string | null> {
  try {
    return (await stripe.checkout.sessions.expire(sessionId)).status
  } catch {
    // Stripe refuses to expire a session that is no longer open: ask what it is now.
    return (await stripe.checkout.sessions.retrieve(sessionId)).status
  }
}

/**
 * Expires, at Stripe, every checkout still pending on a booking, before the booking's amounts change.
 * Call it inside the transaction that holds the trip lock, so no payment of this trip is applied
 * meanwhile. A session that is already complete (paid, webhook not yet applied) cannot be expired:
 * then nothing may change, and CheckoutPendingError says so.
 */
export async function expireCheckoutsOrRefuse(trx: Db, stripe: Stripe | null, bookingId: number, why: string) {
  const open = await trx.selectFrom('payments').select(['id', 'checkout_session_id']).where('booking_id', '=', bookingId)
    .where('status', '=', 'pending').where('checkout_session_id', 'is not', null).execute()
  for (const p of open) {
    // Without Stripe configured no session could have been paid; a stray payment would still be refunded.
    const status = stripe ? await sessionStatusAfterExpiry(stripe, p.checkout_session_id!) : null
    if (status === 'complete') throw new CheckoutPendingError()
    await trx.updateTable('payments').set({ status: 'failed', note: why }).where('id', '=', p.id).where('status', '=', 'pending').execute()
  }
}

/** What may still be refunded of the money applied to a booking: paid − every (non-stray) refund already asked for. */
export async function refundableOf(trx: Db, b: Pick<BookingRow, 'id' | 'paid_minor'>): Promise<number> {
  const asked = await trx.selectFrom('refunds').select('amount_minor').where('booking_id', '=', b.id).where('stray', '=', 0).execute()
  return b.paid_minor - asked.reduce((s, r) => s + r.amount_minor, 0)
}

/**
 * Writes refund rows for `amount` across the booking's succeeded payments (newest first), inside the
 * caller's transaction, after checking the limit there: applied money less every refund already
 * asked for (pending and failed ones count: they will be retried, never forgotten). A stray refund
 * (`paymentId` given) returns money of that payment that was never applied.
 */
export async function requestRefund(trx: Transaction<Database>, bookingId: number, amount: number, reason: string, actorId: number | null, paymentId?: number): Promise<number> {
  if (amount <= 0) return 0
  // PostgreSQL: lock the booking row, so two refunds asked for at once (a cancellation and a manual
  // refund in two instances) check the limit one after the other. SQLite: the transaction already
  // holds the write lock (BEGIN IMMEDIATE).
  const bq = trx.selectFrom('bookings').select(['id', 'paid_minor']).where('id', '=', bookingId)
  const b = await (isPostgres(trx) ? bq.forUpdate() : bq).executeTakeFirstOrThrow()
  const stray = paymentId !== undefined
  let payments = await trx.selectFrom('payments').selectAll().where('booking_id', '=', bookingId).where('status', '=', 'succeeded').orderBy('id', 'desc').execute()
  if (stray) payments = payments.filter((p) => p.id === paymentId)
  const asked = await trx.selectFrom('refunds').select(['payment_id', 'amount_minor']).where('booking_id', '=', bookingId).execute()
  const room = payments.map((p) => ({ p, left: p.amount_minor - asked.filter((r) => r.payment_id === p.id).reduce((s, r) => s + r.amount_minor, 0) }))
  const byPayments = room.reduce((s, r) => s + Math.max(0, r.left), 0)
  const total = stray ? byPayments : Math.min(byPayments, await refundableOf(trx, b))
  if (amount > total) throw new RefundLimitError(`At most ${total} can be refunded`)
  let left = amount
  for (const { p, left: free } of room) {
    if (left <= 0) break
    const part = Math.min(left, free)
    if (part <= 0) continue
    await trx.insertInto('refunds').values({
      booking_id: bookingId, payment_id: p.id, amount_minor: part, reason, status: 'pending', stripe_refund_id: null, error: null,
      created_by: actorId, idem_key: randomUUID(), next_attempt_at: iso(), stray: stray ? 1 : 0,
    }).execute()
    left -= part
  }
  return amount
}

/**
 * Records a payment exactly once and applies it. A payment of a kind the booking no longer expects
 * (deposit after confirmation or cancellation, balance beyond the price) is stray: its money is kept
 * on the ledger and a full refund of the stray part is queued in this same transaction.
 */
export async function completePayment(trx: Transaction<Database>, paymentId: number, paymentIntentId: string | null, cfg: MoneyConfig): Promise<{ applied: number; stray: number }> {
  const p = await trx.selectFrom('payments').selectAll().where('id', '=', paymentId).executeTakeFirst()
  if (!p || p.status === 'succeeded') return { applied: 0, stray: 0 }
  // The conditional update is the exactly-once point: a webhook and a reconciliation in two instances
  // may both get here, and only the one whose update changes the row goes on.
  const won = await trx.updateTable('payments').set({ status: 'succeeded', payment_intent_id: paymentIntentId ?? p.payment_intent_id, completed_at: iso() })
    .where('id', '=', p.id).where('status', '!=', 'succeeded').executeTakeFirst()
  if (!won.numUpdatedRows) return { applied: 0, stray: 0 }
  // The trip row lock orders this with holds, cancellations and other payments of the same trip.
  const ref = await trx.selectFrom('bookings').select('trip_id').where('id', '=', p.booking_id).executeTakeFirstOrThrow()
  await lockTripRow(trx, ref.trip_id)
  // PostgreSQL: the booking row too, so a lapse let go meanwhile (no trip lock) is seen here or waits.
  const bq = trx.selectFrom('bookings').selectAll().where('id', '=', p.booking_id)
  const b = await (isPostgres(trx) ? bq.forUpdate() : bq).executeTakeFirstOrThrow()
  const stray = async (amount: number, why: string) => {
    await requestRefund(trx, b.id, amount, `automatic: ${why}`, null, p.id)
    await audit(trx, { action: 'payment_stray', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id, amountMinor: amount, why } })
  }
  // A deposit counts only when it covers the deposit for the seats the booking holds NOW: a checkout
  // opened for one seat never confirms three (the seat count may have changed after it was opened).
  if (p.kind === 'deposit' && (b.status === 'held' || b.status === 'expired') && b.paid_minor + p.amount_minor < b.deposit_minor) {
    await stray(p.amount_minor, `paid ${p.amount_minor} against a deposit of ${b.deposit_minor} for ${b.seats} seat${b.seats > 1 ? 's' : ''}`)
    return { applied: 0, stray: p.amount_minor }
  }
  if (p.kind === 'deposit' && (b.status === 'held' || b.status === 'expired')) {
    // A hold (even one just lapsed, not yet let go) still has its seats on the counter; an expired
    // booking's seats went back, and are handed out again only if they are still there.
    if (b.status === 'held' || await claimSeats(trx, b.trip_id, b.seats)) {
      const excess = Math.max(0, b.paid_minor + p.amount_minor - b.price_minor)
      await trx.updateTable('bookings').set({ status: 'confirmed', paid_minor: b.paid_minor + p.amount_minor - excess, hold_expires_at: null, updated_at: iso() }).where('id', '=', b.id).execute()
      await audit(trx, { action: 'booking_confirmed', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id, amountMinor: p.amount_minor } })
      await mailBookingConfirmed(trx, b.id, cfg.appUrl)
      await mailReceipt(trx, p.id, cfg.appUrl)
      await alertOrganisers(trx, { kind: 'payment', paymentId: p.id }, cfg.appUrl)
      if (excess > 0) await stray(excess, 'paid beyond the price')
      return { applied: p.amount_minor - excess, stray: excess }
    }
    // Paid after the hold lapsed and the seats went to someone else.
    await trx.updateTable('bookings').set({ status: 'cancelled', cancel_reason: 'paid after the hold lapsed; seats no longer available', updated_at: iso() }).where('id', '=', b.id).execute()
    await stray(p.amount_minor, 'paid after the hold lapsed and the seats were taken')
    return { applied: 0, stray: p.amount_minor }
  }
  if (p.kind === 'balance' && b.status === 'confirmed') {
    const excess = Math.max(0, b.paid_minor + p.amount_minor - b.price_minor)
    await trx.updateTable('bookings').set({ paid_minor: b.paid_minor + p.amount_minor - excess, updated_at: iso() }).where('id', '=', b.id).execute()
    await audit(trx, { action: 'payment_received', subjectUserId: b.user_id, detail: { bookingId: b.id, paymentId: p.id, amountMinor: p.amount_minor, kind: p.kind } })
    await mailReceipt(trx, p.id, cfg.appUrl)
    await alertOrganisers(trx, { kind: 'payment', paymentId: p.id }, cfg.appUrl)
    if (excess > 0) await stray(excess, 'paid beyond the price')
    return { applied: p.amount_minor - excess, stray: excess }
  }
  // A second deposit, or any payment on a cancelled or expired booking: all of it goes back.
  await stray(p.amount_minor, b.status === 'confirmed' ? 'a second payment of the deposit' : `paid on a ${b.status} booking`)
  return { applied: 0, stray: p.amount_minor }
}

/** The payment intent behind a payment: stored, or looked up from its checkout session. */
async function intentOf(stripe: Stripe, p: { payment_intent_id: string | null; checkout_session_id: string | null }): Promise<string | null> {
  if (p.payment_intent_id) return p.payment_intent_id
  if (!p.checkout_session_id) return null
  const s = await stripe.checkout.sessions.retrieve(p.checkout_session_id)
  return typeof s.payment_intent === 'string' ? s.payment_intent : null
}

/** Tries one refund row once. Success counts it, mails the traveller; failure schedules the next try. */
async function attemptRefund(db: Kysely<Database>, stripe: Stripe | null, refundId: number, cfg: MoneyConfig): Promise<'succeeded' | 'failed' | 'skipped'> {
  const r = await db.selectFrom('refunds').selectAll().where('id', '=', refundId).executeTakeFirst()
  if (!r || r.status === 'succeeded') return 'skipped'
  const p = r.payment_id ? await db.selectFrom('payments').selectAll().where('id', '=', r.payment_id).executeTakeFirst() : undefined
  let stripeRefundId: string
  try {
    if (p?.demo) {
      // Demo-seeded payments were never charged: there is nothing at Stripe to give back.
      stripeRefundId = 'demo-no-card'
    } else {
      if (!stripe) throw new Error('Stripe is not configured')
      const intent = p ? await intentOf(stripe, p) : null
      if (!intent) throw new Error('no payment intent is known for this payment')
      // A retry first looks for a refund an earlier attempt made but did not hear back about.
      const earlier = r.attempts > 0 ? (await stripe.refunds.list({ payment_intent: intent, limit: 100 })).data.find((x) => x.metadata?.refundId === String(r.id)) : undefined
      const made = earlier ?? await stripe.refunds.create({ payment_intent: intent, amount: r.amount_minor, metadata: { refundId: String(r.id) } }, { idempotencyKey: `refund-${r.idem_key}-${r.attempts}` })
      if (made.status === 'failed' || made.status === 'canceled') throw new Error(`Stripe reports the refund ${made.status}`)
      stripeRefundId = made.id
    }
  } catch (e) {
    const attempts = r.attempts + 1
    await db.transaction().execute(async (trx) => {
      // Never over a success: a slow attempt (still in the SDK's network retries) may fail after
      // another attempt of the same row has found the refund and counted it; reopening the row
      // would count it a second time on the next retry.
      const marked = await trx.updateTable('refunds').set({ status: 'failed', attempts, error: (e as Error).message.slice(0, 500), next_attempt_at: iso(nowMs() + retryDelayMs(attempts)) })
        .where('id', '=', r.id).where('status', '!=', 'succeeded').executeTakeFirst()
      if (!marked.numUpdatedRows) return
      if (attempts >= REFUND_ALERT_AFTER && !r.organiser_notified_at) {
        await trx.updateTable('refunds').set({ organiser_notified_at: iso() }).where('id', '=', r.id).execute()
        await alertOrganiser(trx, r.booking_id, r.id, r.amount_minor, attempts, (e as Error).message, cfg.appUrl)
      }
    })
    return 'failed'
  }
  await db.transaction().execute(async (trx) => {
    const done = await trx.updateTable('refunds').set({ status: 'succeeded', stripe_refund_id: stripeRefundId, error: null, attempts: r.attempts + 1, completed_at: iso(), next_attempt_at: null })
      .where('id', '=', r.id).where('status', '!=', 'succeeded').executeTakeFirst()
    if (!done.numUpdatedRows) return
    if (!r.stray) await trx.updateTable('bookings').set((eb) => ({ refunded_minor: eb('refunded_minor', '+', r.amount_minor), updated_at: iso() })).where('id', '=', r.booking_id).execute()
    await mailRefund(trx, r.booking_id, r.amount_minor, r.reason, cfg.appUrl)
  })
  return 'succeeded'
}

async function alertOrganiser(trx: Transaction<Database>, bookingId: number, refundId: number, amount: number, attempts: number, error: string, appUrl: string) {
  const b = await trx.selectFrom('bookings').innerJoin('trips', 'trips.id', 'bookings.trip_id').select(['trips.id as tripId', 'trips.title', 'trips.created_by', 'bookings.currency']).where('bookings.id', '=', bookingId).executeTakeFirstOrThrow()
  const to = b.created_by ? await trx.selectFrom('users').select(['email', 'name']).where('id', '=', b.created_by).executeTakeFirst() : undefined
  const recipients = to ? [to] : await trx.selectFrom('users').select(['email', 'name']).where('role', '=', 'organiser').execute()
  for (const u of recipients) {
    await enqueueMail(trx, {
      kind: 'refund-stuck', to: { email: u.email, name: u.name }, bookingId, tripId: b.tripId, dedupeKey: `refund-stuck-${refundId}-${u.email}`,
      ...refundStuckMail({ tripTitle: b.title, bookingId, amountMinor: amount, currency: b.currency, attempts, error, url: `${appUrl}/trips/${b.tripId}/manage` }),
    })
  }
  await audit(trx, { action: 'refund_stuck', detail: { bookingId, refundId, attempts, error } })
}

/** Sends the refunds that are due (new, or failed and due for a retry), a bounded batch at a time. */
export async function processRefunds(db: Kysely<Database>, stripe: Stripe | null, cfg: MoneyConfig, opts: { bookingId?: number; limit?: number } = {}) {
  let q = db.selectFrom('refunds').select('id').where('status', 'in', ['pending', 'failed']).where('next_attempt_at', '<=', iso()).orderBy('id').limit(opts.limit ?? 25)
  if (opts.bookingId) q = q.where('booking_id', '=', opts.bookingId)
  const due = await q.execute()
  const out = { succeeded: 0, failed: 0 }
  for (const r of due) {
    const res = await attemptRefund(db, stripe, r.id, cfg)
    if (res === 'succeeded') out.succeeded++
    if (res === 'failed') out.failed++
  }
  return out
}

/** Handles one verified Stripe event; replays of the same event id change nothing. */
export async function handleStripeEvent(db: Kysely<Database>, stripe: Stripe, event: Stripe.Event, cfg: MoneyConfig) {
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
      await trx.updateTable('payments').set({ status: 'failed', note: event.type === 'checkout.session.expired' ? 'checkout expired' : 'payment failed' })
        .where('id', '=', paymentId).where('status', '=', 'pending').execute()
    }
    return {}
  })
  // Refunds the event queued go out now; housekeeping retries them if Stripe does not answer.
  const p = Number((event.data.object as { metadata?: Record<string, string> }).metadata?.bookingId)
  if (p) await processRefunds(db, stripe, cfg, { bookingId: p })
  return result
}

/**
 * Asks Stripe about checkouts still pending after a while and completes the paid ones (a lost
 * webhook loses nothing). Each payment is handled on its own: one error does not stop the batch;
 * a session Stripe does not know is marked and listed for the organiser.
 */
export async function reconcilePayments(db: Kysely<Database>, stripe: Stripe, cfg: MoneyConfig, olderThanMs = Number(process.env.UMBRAFIELD_RECONCILE_AFTER_MS || 30_000), batch = 50): Promise<number> {
  const pending = await db.selectFrom('payments').select(['id', 'booking_id', 'checkout_session_id']).where('status', '=', 'pending')
    .where('checkout_session_id', 'is not', null).where('created_at', '<', iso(nowMs() - olderThanMs)).orderBy('id').limit(batch).execute()
  let completed = 0
  for (const p of pending) {
    try {
      const s = await stripe.checkout.sessions.retrieve(p.checkout_session_id!)
      if (s.payment_status !== 'paid') {
        if (s.status === 'expired') await db.updateTable('payments').set({ status: 'failed', note: 'checkout expired' }).where('id', '=', p.id).where('status', '=', 'pending').execute()
        continue
      }
      await db.transaction().execute((trx) => completePayment(trx, p.id, typeof s.payment_intent === 'string' ? s.payment_intent : null, cfg))
      await processRefunds(db, stripe, cfg, { bookingId: p.booking_id })
      completed++
    } catch (e) {
      const unknown = (e as { statusCode?: number }).statusCode === 404
      await db.transaction().execute(async (trx) => {
        if (unknown) await trx.updateTable('payments').set({ status: 'failed', note: 'checkout unknown to Stripe' }).where('id', '=', p.id).where('status', '=', 'pending').execute()
        await trx.insertInto('reconciliation_items').values({
          run_at: iso(), booking_id: p.booking_id, payment_id: p.id, kind: unknown ? 'unknown-session' : 'error',
          ledger_net_minor: null, stripe_net_minor: null, detail: `checkout ${p.checkout_session_id}: ${(e as Error).message}`.slice(0, 500),
        }).execute()
      })
    }
  }
  return completed
}

/**
 * The daily comparison: for every booking with card payments, paid − refunded on our ledger against
 * what Stripe holds for its payment intents (received − refunded). Differences replace the last run's
 * list, which the organiser's reconciliation page shows.
 */
export async function reconcileLedger(db: Kysely<Database>, stripe: Stripe, batch = 200) {
  const runAt = iso()
  const bookings = await db.selectFrom('payments').select('booking_id').distinct().where('status', '=', 'succeeded').where('demo', '=', 0).orderBy('booking_id').limit(batch).execute()
  const items: Array<{ booking_id: number; kind: string; ledger_net_minor: number | null; stripe_net_minor: number | null; detail: string }> = []
  for (const { booking_id: bookingId } of bookings) {
    try {
      const pays = await db.selectFrom('payments').selectAll().where('booking_id', '=', bookingId).where('status', '=', 'succeeded').where('demo', '=', 0).execute()
      const refunds = await db.selectFrom('refunds').select(['payment_id', 'amount_minor']).where('booking_id', '=', bookingId).where('status', '=', 'succeeded').execute()
      const ledger = pays.reduce((s, p) => s + p.amount_minor, 0) - refunds.filter((r) => pays.some((p) => p.id === r.payment_id)).reduce((s, r) => s + r.amount_minor, 0)
      let held = 0
      for (const p of pays) {
        const intent = await intentOf(stripe, p)
        if (!intent) throw new Error(`payment ${p.id} has no payment intent`)
        const pi = await stripe.paymentIntents.retrieve(intent)
        held += (pi.amount_received ?? 0) - ((pi as unknown as { amount_refunded?: number }).amount_refunded ?? 0)
      }
      if (held !== ledger) items.push({ booking_id: bookingId, kind: 'difference', ledger_net_minor: ledger, stripe_net_minor: held, detail: `ledger ${ledger}, Stripe ${held}` })
    } catch (e) {
      items.push({ booking_id: bookingId, kind: 'error', ledger_net_minor: null, stripe_net_minor: null, detail: (e as Error).message.slice(0, 500) })
    }
  }
  await db.transaction().execute(async (trx) => {
    await trx.deleteFrom('reconciliation_items').where('kind', 'in', ['difference', 'error']).execute()
    for (const i of items) await trx.insertInto('reconciliation_items').values({ ...i, run_at: runAt, payment_id: null }).execute()
    await audit(trx, { action: 'reconciliation_run', detail: { bookings: bookings.length, differences: items.length } })
  })
  return { runAt, checked: bookings.length, differences: items.length }
}

/** The organiser's view of the last reconciliation. */
export async function reconciliationReport(db: Kysely<Database>) {
  const items = await db.selectFrom('reconciliation_items').leftJoin('bookings', 'bookings.id', 'reconciliation_items.booking_id')
    .leftJoin('trips', 'trips.id', 'bookings.trip_id')
    .select(['reconciliation_items.id', 'reconciliation_items.run_at', 'reconciliation_items.booking_id', 'reconciliation_items.payment_id', 'reconciliation_items.kind',
      'reconciliation_items.ledger_net_minor', 'reconciliation_items.stripe_net_minor', 'reconciliation_items.detail', 'trips.title as trip_title', 'bookings.currency'])
    .orderBy('reconciliation_items.id').execute()
  const last = await db.selectFrom('audit_log').select('at').where('action', '=', 'reconciliation_run').orderBy('id', 'desc').executeTakeFirst()
  const stuck = await db.selectFrom('refunds').select(['id', 'booking_id', 'amount_minor', 'attempts', 'error', 'next_attempt_at']).where('status', '=', 'failed').orderBy('id').execute()
  return {
    lastRunAt: last?.at ?? null,
    data: items.map((i) => ({ id: i.id, runAt: i.run_at, bookingId: i.booking_id, paymentId: i.payment_id, kind: i.kind, ledgerNetMinor: i.ledger_net_minor, stripeNetMinor: i.stripe_net_minor, detail: i.detail, tripTitle: i.trip_title, currency: i.currency })),
    failingRefunds: stuck.map((r) => ({ id: r.id, bookingId: r.booking_id, amountMinor: r.amount_minor, attempts: r.attempts, error: r.error, nextAttemptAt: r.next_attempt_at })),
  }
}

/** A booking's ledger: every payment and refund with its Stripe reference, and the totals. */
export async function ledgerOf(db: Db, b: BookingRow) {
  const payments = await db.selectFrom('payments').selectAll().where('booking_id', '=', b.id).orderBy('id').execute()
  const refunds = await db.selectFrom('refunds').selectAll().where('booking_id', '=', b.id).orderBy('id').execute()
  const entries = [
    ...payments.filter((p) => p.status === 'succeeded').map((p) => ({
      at: p.completed_at ?? p.created_at, type: 'payment' as const, kind: p.kind, amountMinor: p.amount_minor, status: p.status,
      reference: p.demo ? 'demo seed (no card)' : p.payment_intent_id, note: null as string | null,
    })),
    ...refunds.map((r) => ({
      at: r.completed_at ?? r.created_at, type: 'refund' as const, kind: r.reason, amountMinor: -r.amount_minor, status: r.status,
      reference: r.stripe_refund_id, note: r.status === 'failed' ? `will retry${r.next_attempt_at ? ` after ${r.next_attempt_at.slice(0, 16).replace('T', ' ')} UTC` : ''}: ${r.error ?? ''}` : null,
    })),
  ].sort((a, c) => a.at.localeCompare(c.at))
  const paid = payments.filter((p) => p.status === 'succeeded').reduce((s, p) => s + p.amount_minor, 0)
  const refunded = refunds.filter((r) => r.status === 'succeeded').reduce((s, r) => s + r.amount_minor, 0)
  const refunding = refunds.filter((r) => r.status !== 'succeeded').reduce((s, r) => s + r.amount_minor, 0)
  return { entries, paidMinor: paid, refundedMinor: refunded, refundingMinor: refunding, netMinor: paid - refunded, currency: b.currency }
}
