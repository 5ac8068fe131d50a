import { sql, type Kysely, type Transaction } from 'kysely'
import type Stripe from 'stripe'
import { MAX_SEATS_PER_BOOKING, refundPctOn } from '../../shared/schemas/trips'
import { businessDate, nowMs } from './clock'
import type { Database, User } from '../database/schema'
import { audit } from './audit'
import { isPostgres } from '../database/dialect'
import { mailBookingHeld, mailWaitlistOffer, tripKind } from './bookingMail'
import { dueOf, type BookingRow } from './dues'
import { BookingStateError, expireCheckoutsOrRefuse, expireOpenCheckouts, ledgerOf, processRefunds, refundableOf, requestRefund, type MoneyConfig } from './money'
import { NotFoundError } from './planning'
import { holdFast } from './holdStatement'
import { countHit, type RateLimit } from './rateLimits'
import { claimSeats, ensureSeatCounter, releaseSeats, seatsClaimed } from './seatCounter'
import { getTripRow, lockTripRow, seatUse, tiersOf, TripConflictError, TripRuleError } from './trips'
import { alertOrganisers } from './operations/alerts'

type Db = Kysely<Database> | Transaction<Database>
export type { BookingRow }
export { BookingStateError, dueOf }

export class SoldOutError extends Error {
  constructor(public available: number) { super(available === 0 ? 'This trip is sold out: join the waitlist' : `Only ${available} seats are left`) }
}
/** A traveller has one active hold per trip; the page offers to change its seat count instead. */
export class HoldExistsError extends Error {
  constructor(public bookingId: number, public seats: number) { super(`You already hold ${seats} seat${seats > 1 ? 's' : ''} on this trip: change the seat count instead`) }
}
export class WaitlistExistsError extends Error {
  constructor() { super('You are already on the waitlist for this trip') }
}
export class EmailUnconfirmedError extends Error {
  constructor() { super('Confirm your e-mail address first: follow the link we sent you') }
}

const iso = (ms = nowMs()) => new Date(ms).toISOString()

export type BookingConfig = MoneyConfig

/** Marks lapsed holds expired, expires stale waitlist offers, then offers freed seats to the waitlist. */
export async function releaseLapsed(trx: Db, tripId: number, cfg: BookingConfig): Promise<void> {
  const now = iso()
  // Conditional updates: a row another transaction let go meanwhile is not returned here, so the
  // counter gives back exactly the seats this transaction freed.
  const holds = await trx.updateTable('bookings').set({ status: 'expired', updated_at: now })
    .where('trip_id', '=', tripId).where('status', '=', 'held').where('hold_expires_at', '<=', now).returning('seats').execute()
  const offers = await trx.updateTable('waitlist').set({ status: 'expired' })
    .where('trip_id', '=', tripId).where('status', '=', 'offered').where('offer_expires_at', '<=', now).returning('seats').execute()
  await releaseSeats(trx, tripId, [...holds, ...offers].reduce((n, r) => n + r.seats, 0))
  // Nothing lapsed, nothing freed: the waitlist was offered what was free when seats last came back.
  if (holds.length + offers.length > 0) await offerWaitlist(trx, tripId, cfg)
}

/** Whether an account may hold seats (and so be offered them): a traveller with a confirmed address. */
export function mayHoldSeats(u: Pick<User, 'role' | 'email_confirmed_at'>): boolean {
  return u.role === 'traveller' && !!u.email_confirmed_at
}

/** Offers free seats to the waitlist, first come first served, each offer for a limited time. */
export async function offerWaitlist(trx: Db, tripId: number, cfg: BookingConfig): Promise<number[]> {
  const trip = await trx.selectFrom('trips').select('seats').where('id', '=', tripId).executeTakeFirstOrThrow()
  let claimed = await seatsClaimed(trx, tripId)
  if (claimed === undefined) {
    await ensureSeatCounter(trx, tripId)
    claimed = (await seatsClaimed(trx, tripId))!
  }
  let free = trip.seats - claimed
  const offered: number[] = []
  if (free <= 0) return offered
  const waiting = await trx.selectFrom('waitlist').innerJoin('users', 'users.id', 'waitlist.user_id')
    .select(['waitlist.id', 'waitlist.seats', 'users.role', 'users.email_confirmed_at'])
    .where('waitlist.trip_id', '=', tripId).where('waitlist.status', '=', 'waiting').orderBy('waitlist.id').execute()
  for (const w of waiting) {
    if (w.seats > free) continue
    // Seats are offered only to someone who could hold them now: a confirmed address and still a
    // traveller (an account promoted to guide or organiser since joining is skipped, not offered).
    if (!mayHoldSeats(w)) continue
    // The offer's seats are handed out like a hold's; the entry changes only if it is still waiting.
    if (!(await claimSeats(trx, tripId, w.seats))) break
    const made = await trx.updateTable('waitlist').set({ status: 'offered', offer_expires_at: iso(nowMs() + cfg.offerHours * 3600_000) })
      .where('id', '=', w.id).where('status', '=', 'waiting').executeTakeFirst()
    if (!Number(made.numUpdatedRows)) {
      await releaseSeats(trx, tripId, w.seats)
      continue
    }
    await mailWaitlistOffer(trx, w.id, cfg.appUrl)
    free -= w.seats
    offered.push(w.id)
  }
  return offered
}

/**
 * Holds seats for 15 minutes (or the configured hold), counting the request against `limit` (429
 * RateLimitedError over it). PostgreSQL: usually one statement after the sign-in's read (holdFast).
 * Otherwise, and when the statement leaves it to one (an offer to take up, lapsed holds or offers to
 * let go first), a transaction whose seats are handed out by the counter's one conditional statement,
 * issued last: no hold waits for another hold's lock.
 */
export async function createHold(db: Kysely<Database>, user: User, tripId: number, seats: number, cfg: BookingConfig, limit: RateLimit) {
  if (!user.email_confirmed_at) {
    await countHit(db, limit)
    throw new EmailUnconfirmedError()
  }
  if (isPostgres(db)) {
    const r = await holdFast(db, { user, tripId, seats, holdMinutes: cfg.holdMinutes, appUrl: cfg.appUrl, limit, kindOf: (t) => tripKindSoon(db, t) })
    if (r.held) return { id: r.id, status: 'held' as const, holdExpiresAt: r.holdExpiresAt }
    if (r.refused === 'not_found') throw new NotFoundError('No such trip')
    if (r.refused === 'sales_closed') throw salesClosed()
    if (r.refused === 'hold_exists') throw new HoldExistsError(r.bookingId, r.seats)
    // Refused for one seat means none was free when the counter was asked; for more, say how many were.
    if (r.refused === 'sold_out') throw new SoldOutError(seats === 1 ? 0 : r.available)
  } else {
    await countHit(db, limit)
  }
  return holdInTransaction(db, user, tripId, seats, cfg)
}

const salesClosed = () => new TripConflictError('sales_closed', 'Sales are closed for this trip: the organiser is not taking new bookings')

/** The hold's transaction (see createHold); the request has been counted. */
async function holdInTransaction(db: Kysely<Database>, user: User, tripId: number, seats: number, cfg: BookingConfig) {
  const now = iso()
  // Everything the hold needs to know before it starts, in one read.
  const trip = await db.selectFrom('trips').leftJoin('seat_counters', 'seat_counters.trip_id', 'trips.id').selectAll('trips')
    .select((eb) => [
      'seat_counters.claimed',
      eb.exists(eb.selectFrom('bookings').select('id').where('trip_id', '=', tripId).where('status', '=', 'held').where('hold_expires_at', '<=', now)).as('lapsedHold'),
      eb.exists(eb.selectFrom('waitlist').select('id').where('trip_id', '=', tripId).where('status', '=', 'offered').where('offer_expires_at', '<=', now)).as('lapsedOffer'),
      eb.exists(eb.selectFrom('bookings').select('id').where('trip_id', '=', tripId).where('user_id', '=', user.id).where('status', '=', 'held')).as('mine'),
      eb.selectFrom('waitlist').select((w) => w.fn.coalesce(w.fn.sum<number>('seats'), w.val(0)).as('n'))
        .where('trip_id', '=', tripId).where('user_id', '=', user.id).where('status', '=', 'offered').as('myOffer'),
    ])
    .where('trips.id', '=', tripId).executeTakeFirst()
  if (!trip || trip.status !== 'published') throw new NotFoundError('No such trip')
  if (!trip.sales_open) throw salesClosed()
  if (trip.claimed === null) await ensureSeatCounter(db, tripId)
  if (trip.lapsedHold || trip.lapsedOffer) {
    // Lapsed holds and offers still count until let go: let them go first (a short transaction of its own).
    await db.transaction().execute((trx) => releaseLapsed(trx, tripId, cfg))
  } else if (!trip.mine && trip.claimed !== null && seats > trip.seats - Number(trip.claimed) + Number(trip.myOffer)) {
    // Sold out: say so at once. A traveller who already holds seats here is told so (below) instead.
    throw new SoldOutError(Math.max(0, trip.seats - Number(trip.claimed) + Number(trip.myOffer)))
  }
  // What the held e-mail says about the eclipse seen at the trip's site.
  const kind = await tripKindSoon(db, trip)
  const hold = async (trx: Transaction<Database>) => {
    // PostgreSQL: one hold at a time per traveller and trip (two tabs), never across travellers.
    if (isPostgres(trx)) await sql`select pg_advisory_xact_lock(${tripId}::int, ${user.id}::int)`.execute(trx)
    // Any hold of this traveller here, lapsed or not (lapsed ones were let go above): bookings_one_hold allows one.
    const mine = await trx.selectFrom('bookings').select(['id', 'seats']).where('trip_id', '=', tripId).where('user_id', '=', user.id)
      .where('status', '=', 'held').executeTakeFirst()
    if (mine) throw new HoldExistsError(mine.id, mine.seats)
    const holdExpiresAt = iso(nowMs() + cfg.holdMinutes * 60_000)
    const b = await trx.insertInto('bookings').values({
      trip_id: tripId, user_id: user.id, seats, status: 'held', hold_expires_at: holdExpiresAt,
      price_minor: seats * trip.price_minor, deposit_minor: seats * trip.deposit_minor, currency: trip.currency,
    }).returning('id').executeTakeFirstOrThrow()
    // Seats offered to this traveller become the hold's: the counter already has them.
    const accepted = await trx.updateTable('waitlist').set({ status: 'accepted', booking_id: b.id })
      .where('trip_id', '=', tripId).where('user_id', '=', user.id).where('status', '=', 'offered').returning('seats').execute()
    const offeredMine = accepted.reduce((n, r) => n + r.seats, 0)
    await audit(trx, { action: 'booking_hold', actorUserId: user.id, detail: { bookingId: b.id, tripId, seats } })
    await mailBookingHeld(trx, b.id, cfg.appUrl, kind ? { kind } : undefined)
    await alertOrganisers(trx, { kind: 'booking', bookingId: b.id }, cfg.appUrl)
    // Last: from here to the commit is all the time the counter's row is locked.
    if (!(await claimSeats(trx, tripId, seats - offeredMine, { recount: false }))) {
      throw new SoldOutError(Math.max(0, trip.seats - ((await seatsClaimed(trx, tripId)) ?? 0) + offeredMine))
    }
    return { id: b.id, status: 'held' as const, holdExpiresAt }
  }
  // PostgreSQL may end a deadlock with this traveller's other request (one statement on the fast
  // path, which locks the counter first) by failing this one: then it is tried once more.
  return db.transaction().execute(hold).catch((e: { code?: string }) => {
    if (e.code === '40P01') return db.transaction().execute(hold)
    throw e
  })
}

/**
 * The kind of eclipse at a trip's site for the held e-mail's wording, remembered for a minute per
 * eclipse and site (working it out runs the engine; a rush of holds on one trip needs it once).
 */
const kindMemo = new Map<string, { kind: ReturnType<typeof tripKind>; at: number }>()
function tripKindSoon(db: Kysely<Database>, t: { eclipse_id: string; primary_site_id: number }) {
  const key = `${t.eclipse_id}:${t.primary_site_id}`
  const hit = kindMemo.get(key)
  if (hit && nowMs() - hit.at < 60_000) return hit.kind
  // The promise is remembered, not the answer: holds arriving together wait for one working-out.
  const kind = tripKind(db, t)
  if (kindMemo.size > 500) kindMemo.clear()
  kindMemo.set(key, { kind, at: nowMs() })
  kind.catch(() => { if (kindMemo.get(key)?.kind === kind) kindMemo.delete(key) })
  return kind
}

/**
 * Changes the seat count of the caller's active hold (seats re-checked, deposit and price follow).
 * Under the trip lock, any checkout opened for the old amount is first expired at Stripe; one that is
 * already paid (not yet applied) cannot be, and then nothing changes (CheckoutPendingError, 409).
 */
export async function changeHoldSeats(db: Kysely<Database>, stripe: Stripe | null, user: User, bookingId: number, seats: number, cfg: BookingConfig) {
  return db.transaction().execute(async (trx) => {
    const ref = await trx.selectFrom('bookings').select(['id', 'trip_id']).where('id', '=', bookingId).where('user_id', '=', user.id).executeTakeFirst()
    if (!ref) throw new NotFoundError('No such booking')
    const trip = (await lockTripRow(trx, ref.trip_id))!
    // Read after the lock: a payment applied meanwhile is seen here. PostgreSQL: the row is locked too,
    // so a lapse let go meanwhile (which takes no trip lock) waits for this change, or is seen.
    const bq = trx.selectFrom('bookings').selectAll().where('id', '=', bookingId)
    const b = await (isPostgres(trx) ? bq.forUpdate() : bq).executeTakeFirstOrThrow()
    if (b.status !== 'held' || !b.hold_expires_at || b.hold_expires_at <= iso()) throw new BookingStateError('Only an active hold can change its seats')
    if (b.paid_minor > 0) throw new BookingStateError('A payment is under way on this hold')
    await expireCheckoutsOrRefuse(trx, stripe, b.id, 'superseded: the seat count changed')
    await releaseLapsed(trx, b.trip_id, cfg)
    if (!(await claimSeats(trx, b.trip_id, seats - b.seats))) {
      throw new SoldOutError(Math.max(0, trip.seats - ((await seatsClaimed(trx, b.trip_id)) ?? 0) + b.seats))
    }
    await trx.updateTable('bookings').set({ seats, price_minor: seats * trip.price_minor, deposit_minor: seats * trip.deposit_minor, updated_at: iso() }).where('id', '=', b.id).execute()
    await audit(trx, { action: 'booking_hold_change', actorUserId: user.id, detail: { bookingId: b.id, from: b.seats, to: seats } })
    return { id: b.id, status: 'held' as const, seats }
  })
}

/**
 * Joins the waitlist: like a hold, only with a confirmed address, and for no more seats than one hold
 * may take (the per-booking cap, and never more than the trip has).
 */
export async function joinWaitlist(db: Kysely<Database>, user: User, tripId: number, seats: number, cfg: BookingConfig) {
  if (!user.email_confirmed_at) throw new EmailUnconfirmedError()
  return db.transaction().execute(async (trx) => {
    const trip = await lockTripRow(trx, tripId)
    if (!trip || trip.status !== 'published') throw new NotFoundError('No such trip')
    const cap = Math.min(MAX_SEATS_PER_BOOKING, trip.seats)
    if (seats > cap) throw new TripRuleError('seats', `at most ${cap} seat${cap > 1 ? 's' : ''} per booking on this trip`)
    await releaseLapsed(trx, tripId, cfg)
    const already = await trx.selectFrom('waitlist').select('id').where('trip_id', '=', tripId).where('user_id', '=', user.id).where('status', 'in', ['waiting', 'offered']).executeTakeFirst()
    if (already) throw new WaitlistExistsError()
    const use = await seatUse(trx as unknown as Kysely<Database>, tripId, iso(), user.id)
    if (trip.seats - use.taken - use.offered >= seats) throw new BookingStateError('Seats are available: book them instead')
    const w = await trx.insertInto('waitlist').values({ trip_id: tripId, user_id: user.id, seats, status: 'waiting' }).returning('id').executeTakeFirstOrThrow()
    await alertOrganisers(trx, { kind: 'waitlist', waitlistId: w.id }, cfg.appUrl)
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
    ledger: await ledgerOf(db, b),
    cancelReason: b.cancel_reason,
  }
}

/**
 * Cancels a booking; refunds follow the trip's tiers on today's date. The status change, the limit
 * check and the refund rows are one transaction; open checkouts are expired; Stripe is asked after.
 */
export async function cancelBooking(db: Kysely<Database>, stripe: Stripe | null, user: User, bookingId: number, cfg: BookingConfig) {
  const b = await bookingFor(db, user, bookingId)
  if (b.status !== 'held' && b.status !== 'confirmed') throw new BookingStateError(`This booking is already ${b.status}`)
  const trip = await getTripRow(db, b.trip_id)
  const pct = b.status === 'confirmed' ? refundPctOn(tiersOf(trip), businessDate()) : 0
  const refundMinor = await db.transaction().execute(async (trx) => {
    await lockTripRow(trx, b.trip_id)
    const changed = await trx.updateTable('bookings').set({ status: 'cancelled', cancel_reason: `cancelled by ${user.id === b.user_id ? 'the traveller' : 'an organiser'}`, updated_at: iso() })
      .where('id', '=', b.id).where('status', 'in', ['held', 'confirmed']).returning('seats').executeTakeFirst()
    if (!changed) throw new BookingStateError('This booking changed meanwhile; reload and try again')
    await releaseSeats(trx, b.trip_id, changed.seats)
    const now = await trx.selectFrom('bookings').select(['id', 'paid_minor']).where('id', '=', b.id).executeTakeFirstOrThrow()
    const amount = Math.round((Math.max(0, await refundableOf(trx, now)) * pct) / 100)
    await requestRefund(trx, b.id, amount, `cancellation, ${pct}% tier`, user.id)
    await audit(trx, { action: 'booking_cancel', actorUserId: user.id, subjectUserId: b.user_id, detail: { bookingId: b.id, refundPct: pct, refundMinor: amount } })
    await alertOrganisers(trx, { kind: 'cancellation', bookingId: b.id, byOrganiser: user.id !== b.user_id }, cfg.appUrl)
    await offerWaitlist(trx, b.trip_id, cfg)
    return amount
  })
  await expireOpenCheckouts(db, stripe, b.id, 'booking cancelled')
  await processRefunds(db, stripe, cfg, { bookingId: b.id })
  return { id: b.id, status: 'cancelled' as const, refundPct: pct, refundMinor }
}

/** An organiser's manual refund with a reason: limit check, refund rows and audit in one transaction. */
export async function manualRefund(db: Kysely<Database>, stripe: Stripe, organiser: User, bookingId: number, amount: number, reason: string, cfg: BookingConfig) {
  const b = await bookingFor(db, organiser, bookingId)
  await db.transaction().execute(async (trx) => {
    await requestRefund(trx, b.id, amount, `manual: ${reason}`, organiser.id)
    await audit(trx, { action: 'manual_refund', actorUserId: organiser.id, subjectUserId: b.user_id, detail: { bookingId: b.id, amountMinor: amount, reason } })
  })
  const sent = await processRefunds(db, stripe, cfg, { bookingId: b.id })
  return { refundMinor: amount, sent: sent.succeeded > 0 }
}

/** Periodic housekeeping for every trip: lapsed holds and offers. */
export async function housekeeping(db: Kysely<Database>, cfg: BookingConfig) {
  const trips = await db.selectFrom('trips').select('id').where('status', '=', 'published').execute()
  for (const t of trips) {
    await db.transaction().execute(async (trx) => {
      await lockTripRow(trx, t.id)
      await releaseLapsed(trx, t.id, cfg)
    })
  }
}
