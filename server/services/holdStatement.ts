import { sql, type ExpressionBuilder, type Kysely, type Selectable } from 'kysely'
import { compiledOnce } from '../database/compiledOnce'
import type { LocalKind } from '../../shared/safety/text'
import type { Database, TripsTable, User } from '../database/schema'
import { auditValues } from './audit'
import { businessDate, nowIso, nowMs } from './clock'
import * as T from './mailTemplates'
import { DEFAULT_ALERT_MODE, holdAlertSummary } from './operations/alerts'
import { alertMail } from './operations/operationsMail'
import { outboxValues } from './outbox'
import { ensureSeatCounter } from './seatCounter'
import { countHit, hitUpsert, othersSum, refuseCounted, windowCounts, windowSlots, type RateLimit, type SlotBounds } from './rateLimits'

/** The trip's fields a hold uses: whether it sells, its seats, and what the e-mails and the booking say. */
export type HoldTrip = Pick<Selectable<TripsTable>, 'id' | 'status' | 'sales_open' | 'seats' | 'title' | 'price_minor' | 'deposit_minor' | 'currency' | 'eclipse_id' | 'primary_site_id'>

/**
 * What this instance last read of a trip, for a minute. A hold's statement checks every remembered
 * field it relies on against the row (see holdFast), so a trip edited meanwhile, here or by another
 * instance, is never held on old terms: the statement then changes nothing and the hold reads again.
 * Concurrent holds of one trip share one read.
 */
const TRIP_MEMO_MS = 60_000
const tripMemos = new WeakMap<Kysely<Database>, Map<number, { trip: Promise<HoldTrip | undefined>; at: number }>>()

function readHoldTrip(db: Kysely<Database>, tripId: number): Promise<HoldTrip | undefined> {
  return db.selectFrom('trips')
    .select(['id', 'status', 'sales_open', 'seats', 'title', 'price_minor', 'deposit_minor', 'currency', 'eclipse_id', 'primary_site_id'])
    .where('id', '=', tripId).executeTakeFirst()
}

const sells = (t: HoldTrip | undefined): t is HoldTrip => !!t && t.status === 'published' && !!t.sales_open

/**
 * The trip as remembered, or read now. A trip that does not sell is answered from a fresh read only:
 * a remembered one is read again first, so a refusal never rests on an old copy.
 */
async function holdTrip(db: Kysely<Database>, tripId: number, opts: { fresh?: boolean } = {}): Promise<HoldTrip | undefined> {
  let memos = tripMemos.get(db)
  if (!memos) tripMemos.set(db, memos = new Map())
  const now = nowMs()
  const hit = memos.get(tripId)
  if (!opts.fresh && hit && now - hit.at < TRIP_MEMO_MS) {
    const trip = await hit.trip
    if (sells(trip)) return trip
  }
  if (memos.size > 500) for (const [k, m] of memos) if (now - m.at >= TRIP_MEMO_MS) memos.delete(k)
  const trip = readHoldTrip(db, tripId)
  const memo = { trip, at: now }
  memos.set(tripId, memo)
  trip.catch(() => { if (memos.get(tripId) === memo) memos.delete(tripId) })
  return trip
}

/**
 * Booking ids for holds, drawn from the bookings sequence in blocks (one round trip per block, shared
 * by concurrent holds), so the held e-mail can link to its booking before the statement runs. An id
 * a refused hold did not use goes back for the next hold; one left unused at shutdown is only a gap (a
 * sequence never hands out a number twice).
 */
const ID_BLOCK = 32
const idPools = new WeakMap<Kysely<Database>, { spare: number[]; refill?: Promise<void> }>()

/** `conn`: the connection the caller holds, so a refill never waits for another one from the pool. */
async function takeBookingId(db: Kysely<Database>, conn: Kysely<Database>): Promise<number> {
  let pool = idPools.get(db)
  if (!pool) idPools.set(db, pool = { spare: [] })
  while (!pool.spare.length) {
    pool.refill ??= sql<{ id: string }>`select nextval(pg_get_serial_sequence('bookings', 'id')) as id from generate_series(1, ${ID_BLOCK}::int)`.execute(conn)
      .then((r) => { pool!.spare.push(...r.rows.map((x) => Number(x.id)).sort((a, b) => a - b)) })
      .finally(() => { pool!.refill = undefined })
    await pool.refill
  }
  return pool.spare.shift()!
}

function returnBookingId(db: Kysely<Database>, id: number) {
  idPools.get(db)?.spare.unshift(id)
}

export type FastHoldResult =
  | { held: true; id: number; holdExpiresAt: string }
  /** No room: `available` seats were free when the counter was asked. */
  | { held: false; refused: 'sold_out'; available: number }
  | { held: false; refused: 'hold_exists'; bookingId: number; seats: number }
  | { held: false; refused: 'not_found' | 'sales_closed' }
  /** The transaction must decide (an offer to take up, lapsed holds or offers to let go first, no counter yet); the request was counted. */
  | { held: false; refused: 'slow' }

/**
 * A hold as ONE statement (PostgreSQL), after the sign-in's read: the request is counted against its
 * limit, the seat counter's conditional UPDATE … RETURNING hands out the seats, and the booking, its
 * audit row, its e-mail and the organisers' alerts (one per organiser, with the mail of those who chose
 * "immediate") are written from that RETURNING by data-modifying CTEs, outside any explicit transaction.
 * The counter row is locked only while the statement runs, never across a round trip to the app, so
 * holds of one trip do not queue behind each other's commits.
 *
 * The counter hands out seats only if every condition holds, and otherwise the statement writes
 * nothing but the count of the request (its final SELECT says which condition failed):
 * - the request is within its limit (rl);
 * - the trip still sells on the remembered terms (status, sales, title, prices, currency, eclipse and
 *   site: the e-mails were written from them);
 * - the traveller holds nothing here and has no offer to take up, and no hold or offer of the trip has
 *   lapsed (those are let go by the transaction first, which may offer the seats to the waitlist);
 * - there is room.
 * Two holds of one traveller racing past the check still meet the partial unique index
 * bookings_one_hold (migration 0022): that fails the whole statement, which then changes nothing.
 */
export async function holdFast(db: Kysely<Database>, a: {
  user: User; tripId: number; seats: number; holdMinutes: number; appUrl: string; limit: RateLimit
  kindOf: (trip: HoldTrip) => Promise<LocalKind | undefined>
}): Promise<FastHoldResult> {
  const { user, tripId, seats, limit } = a
  // Whether a statement has counted this request already (a later one then only reads the count).
  let counted = false
  const countOnce = () => counted ? Promise.resolve() : countHit(db, limit)
  let stale = false
  for (let attempt = 0; attempt < 3; attempt++) {
    const trip = await holdTrip(db, tripId, { fresh: stale })
    // Refused before any statement: the request is counted on its own.
    if (!trip || trip.status !== 'published') return countOnce().then(() => ({ held: false, refused: 'not_found' }))
    if (!trip.sales_open) return countOnce().then(() => ({ held: false, refused: 'sales_closed' }))
    const holdExpiresAt = new Date(nowMs() + a.holdMinutes * 60_000).toISOString()
    const kind = await a.kindOf(trip)
    // Decided once a connection is free (holds queue for the pool in a rush, and meanwhile others may
    // find the trip full): seen full lately, ask first without writing the e-mails (most such requests
    // are refused). Nothing inside asks the pool for a second connection.
    const r = await db.connection().execute(async (conn) => {
      const checkOnly = seenFull(db, tripId)
      const id = checkOnly ? 0 : await takeBookingId(db, conn)
      try {
        const r = await statement(conn, { id, user, trip, seats, limit, counted, kind, appUrl: a.appUrl, holdExpiresAt, checkOnly })
        // The id goes back only on a clean "not held": after any error it may have been used (a lost
        // reply to a statement that committed), so it is dropped (a gap in the sequence).
        if (!r.held && !checkOnly) returnBookingId(db, id)
        return r
      } catch (e) {
        const { code, constraint } = e as { code?: string; constraint?: string }
        // The whole statement changed nothing when it failed on bookings_one_hold (a second hold of
        // this traveller racing past the check) or was chosen to end a deadlock (this traveller's
        // other request on the transaction path, which takes the counter last): the transaction decides.
        if ((code === '23505' && constraint === 'bookings_one_hold') || code === '40P01') return 'raced' as const
        throw e
      }
    })
    if (r === 'raced') return countOnce().then(() => ({ held: false, refused: 'slow' }))
    counted = true
    if (r.held) {
      // The last seats just went: the next requests here ask first.
      markFull(db, tripId, r.claimed !== null && r.claimed + seats >= r.tripSeats)
      return { held: true, id: r.id, holdExpiresAt: r.holdExpiresAt }
    }
    if (r.overLimit) throw await refuseCounted(db, limit.key, r.slots, r.limitOldest)
    // Edited since this instance read it: read again.
    if (!r.fresh) { stale = true; continue }
    // The trip's first hold: make its counter, then ask again.
    if (r.claimed === null) { await ensureSeatCounter(db, tripId); continue }
    if (r.lapsed || r.myOffer) return { held: false, refused: 'slow' }
    if (r.mine) return { held: false, refused: 'hold_exists', bookingId: r.mine.id, seats: r.mine.seats }
    if (r.claimed + seats > r.tripSeats) {
      if (r.claimed >= r.tripSeats) markFull(db, tripId, true)
      return { held: false, refused: 'sold_out', available: Math.max(0, r.tripSeats - r.claimed) }
    }
    // Room after all (the check only asked, or seats came back meanwhile): hold it.
    markFull(db, tripId, false)
  }
  // Edited again and again while asking: the transaction decides.
  return { held: false, refused: 'slow' }
}

/**
 * Trips this instance saw full in the last few seconds. Only a hint for which statement to send
 * first: the refusal itself always comes from the database's answer to this request.
 */
const FULL_HINT_MS = 5_000
const fullHints = new WeakMap<Kysely<Database>, Map<number, number>>()
function seenFull(db: Kysely<Database>, tripId: number): boolean {
  const at = fullHints.get(db)?.get(tripId)
  return at !== undefined && nowMs() - at < FULL_HINT_MS
}
function markFull(db: Kysely<Database>, tripId: number, full: boolean) {
  let hints = fullHints.get(db)
  if (!hints) fullHints.set(db, hints = new Map())
  if (!full) hints.delete(tripId)
  else {
    if (hints.size > 500) hints.clear()
    hints.set(tripId, nowMs())
  }
}

/** The hold statement's values (see holdFast); every one goes to the database as a parameter. */
interface HoldArgs extends Record<string, unknown> {
  id: number; userId: number; seats: number; holdExpiresAt: string; priceMinor: number; depositMinor: number
  tripId: number; title: string; tripPriceMinor: number; tripDepositMinor: number; currency: string; eclipseId: string; siteId: number
  limitKey: string; slotStart: string; limitFrom: string; limitExpiresAt: string; add: 0 | 1; limit: number; now: string
  summary: string; businessDate: string; at: string
  alertSubject: string; alertHtml: string; alertText: string; alertAttachments: string; alertNextAttemptAt: string
}

// The rows the statement writes, in the shapes audit and outbox write them (their columns, named by a sample).
const AUDIT_COLUMNS = Object.keys(auditValues({ action: 'booking_hold' })) as Array<keyof ReturnType<typeof auditValues>>
const OUTBOX_COLUMNS = Object.keys(outboxValues({ kind: 'booking-held', to: { email: '', name: '' }, subject: '', html: '', text: '' })) as Array<keyof ReturnType<typeof outboxValues>>
const auditArg = (c: string) => `audit_${c}`
const mailArg = (c: string) => `mail_${c}`

/** The trip on the remembered terms, for the statement's conditions. */
function tripAsRemembered<DB extends Database, TB extends keyof DB>(eb: ExpressionBuilder<DB, TB>, p: HoldArgs) {
  return (eb as unknown as ExpressionBuilder<Database, never>).selectFrom('trips').where('id', '=', p.tripId)
    .where('status', '=', 'published').where('sales_open', '=', 1).where('title', '=', p.title)
    .where('price_minor', '=', p.tripPriceMinor).where('deposit_minor', '=', p.tripDepositMinor).where('currency', '=', p.currency)
    .where('eclipse_id', '=', p.eclipseId).where('primary_site_id', '=', p.siteId)
}

/** The limit's slot bounds among the statement's arguments. */
const boundsOf = (p: HoldArgs): SlotBounds => ({ slotStart: p.slotStart, from: p.limitFrom, expiresAt: p.limitExpiresAt })

const holdStatement = compiledOnce((db, p: HoldArgs) => {
  const slots = boundsOf(p)
  const delivery = sql<'immediate' | 'digest'>`coalesce(alert_preferences.mode, ${DEFAULT_ALERT_MODE})`
  return db
    .with('rl', (w) => hitUpsert(w, p.limitKey, slots, p.add))
    .with('c', (w) => w.updateTable('seat_counters').set((eb) => ({ claimed: eb('claimed', '+', p.seats) }))
      .where('trip_id', '=', p.tripId)
      .where((eb) => eb.and([
        // Room, on the remembered terms (no row, so no room, if the trip changed).
        eb(eb('claimed', '+', p.seats), '<=', tripAsRemembered(eb, p).select('seats')),
        // Within the limit; a request counted by an earlier statement (add 0) is not judged again.
        eb.or([eb(sql<number>`${p.add}::int`, '=', 0), eb(eb(eb.selectFrom('rl').select('hits'), '+', othersSum(eb, p.limitKey, slots)), '<=', p.limit)]),
        eb.not(eb.exists(eb.selectFrom('bookings').select('id').where('trip_id', '=', p.tripId).where('status', '=', 'held')
          .where((b) => b.or([b('user_id', '=', p.userId), b('hold_expires_at', '<=', p.now)])))),
        eb.not(eb.exists(eb.selectFrom('waitlist').select('id').where('trip_id', '=', p.tripId).where('status', '=', 'offered')
          .where((o) => o.or([o('user_id', '=', p.userId), o('offer_expires_at', '<=', p.now)])))),
      ]))
      .returning('trip_id'))
    .with('b', (w) => w.insertInto('bookings')
      .columns(['id', 'trip_id', 'user_id', 'seats', 'status', 'hold_expires_at', 'price_minor', 'deposit_minor', 'currency'])
      .expression((eb) => eb.selectFrom('c').select([
        sql<number>`${p.id}`.as('id'), 'c.trip_id', sql<number>`${p.userId}`.as('user_id'), sql<number>`${p.seats}`.as('seats'), sql<string>`${'held'}`.as('status'),
        sql<string>`${p.holdExpiresAt}`.as('hold_expires_at'), sql<number>`${p.priceMinor}`.as('price_minor'), sql<number>`${p.depositMinor}`.as('deposit_minor'),
        sql<string>`${p.currency}`.as('currency'),
      ]))
      .returning('id'))
    .with('a', (w) => w.insertInto('audit_log').columns(AUDIT_COLUMNS)
      .expression((eb) => eb.selectFrom('b').select(AUDIT_COLUMNS.map((c) => sql`${p[auditArg(c)]}`.as(c)))).returning('id'))
    .with('o', (w) => w.insertInto('organiser_alerts')
      .columns(['user_id', 'trip_id', 'booking_id', 'kind', 'summary', 'business_date', 'delivery', 'created_at'])
      .expression((eb) => eb.selectFrom('users').leftJoin('alert_preferences', 'alert_preferences.user_id', 'users.id')
        .select(['users.id', sql<number>`${p.tripId}`.as('trip_id'), sql<number>`${p.id}`.as('booking_id'), sql<string>`${'booking'}`.as('kind'),
          sql<string>`${p.summary}`.as('summary'), sql<string>`${p.businessDate}`.as('business_date'), delivery.as('delivery'), sql<string>`${p.at}`.as('created_at')])
        .where('users.role', '=', 'organiser').where((u) => u.exists(u.selectFrom('b').select('b.id'))))
      .returning('id'))
    .with('om', (w) => w.insertInto('outbox')
      .columns(['message_id', 'kind', 'to_email', 'to_name', 'subject', 'html', 'text', 'attachments', 'next_attempt_at', 'booking_id', 'trip_id'])
      .expression((eb) => eb.selectFrom('users').leftJoin('alert_preferences', 'alert_preferences.user_id', 'users.id')
        // Each message its own Message-ID (outboxValues' form: <uuid@umbrafield>).
        .select([sql<string>`'<' || gen_random_uuid()::text || '@umbrafield>'`.as('message_id'), sql<string>`${'organiser-alert'}`.as('kind'),
          'users.email', 'users.name', sql<string>`${p.alertSubject}`.as('subject'), sql<string>`${p.alertHtml}`.as('html'),
          sql<string>`${p.alertText}`.as('text'), sql<string>`${p.alertAttachments}`.as('attachments'),
          sql<string>`${p.alertNextAttemptAt}`.as('next_attempt_at'), sql<number>`${p.id}`.as('booking_id'), sql<number>`${p.tripId}`.as('trip_id')])
        .where('users.role', '=', 'organiser').where(delivery, '=', 'immediate').where((u) => u.exists(u.selectFrom('b').select('b.id'))))
      .returning('id'))
    .with('m', (w) => w.insertInto('outbox').columns(OUTBOX_COLUMNS)
      .expression((eb) => eb.selectFrom('b').select(OUTBOX_COLUMNS.map((c) => sql`${p[mailArg(c)]}`.as(c)))).returning('id'))
    // What the statement saw before it wrote (a CTE's changes are not visible here, only their RETURNING).
    .selectNoFrom((eb) => [eb.selectFrom('b').select((q) => q.fn.countAll<string>().as('n')).as('held'), ...observed(eb, p, slots)])
})

/**
 * A lighter statement for a trip this instance last saw full: it counts the request and reads what
 * holdFast decides on (no e-mails written, no booking id taken). With room after all, the full
 * statement follows, counting nothing more.
 */
const checkStatement = compiledOnce((db, p: HoldArgs) => {
  const slots = boundsOf(p)
  return db.with('rl', (w) => hitUpsert(w, p.limitKey, slots, p.add))
    .selectNoFrom((eb) => [sql<string>`0`.as('held'), ...observed(eb, p, slots)])
})

/** What holdFast decides on: the request's count, the trip's terms, seats, lapses, and the traveller's hold and offer. */
function observed<DB extends Database, TB extends keyof DB>(ebIn: ExpressionBuilder<DB, TB>, p: HoldArgs, slots: SlotBounds) {
  const eb = ebIn as unknown as ExpressionBuilder<Database & { rl: { hits: number } }, never>
  return [
    eb.selectFrom('rl').select('hits').as('limitHits'),
    ...windowCounts(eb, p.limitKey, slots),
    eb.exists(tripAsRemembered(eb, p).select('id')).as('fresh'),
    eb.selectFrom('trips').select('seats').where('id', '=', p.tripId).as('tripSeats'),
    eb.selectFrom('seat_counters').select('claimed').where('trip_id', '=', p.tripId).as('claimed'),
    eb.exists(eb.selectFrom('bookings').select('id').where('trip_id', '=', p.tripId).where('status', '=', 'held').where('hold_expires_at', '<=', p.now))
      .as('lapsedHold'),
    eb.exists(eb.selectFrom('waitlist').select('id').where('trip_id', '=', p.tripId).where('status', '=', 'offered').where('offer_expires_at', '<=', p.now))
      .as('lapsedOffer'),
    eb.exists(eb.selectFrom('waitlist').select('id').where('trip_id', '=', p.tripId).where('user_id', '=', p.userId).where('status', '=', 'offered')).as('myOffer'),
    eb.selectFrom('bookings').select(sql<string>`json_build_object('id', id, 'seats', seats)::text`.as('j'))
      .where('trip_id', '=', p.tripId).where('user_id', '=', p.userId).where('status', '=', 'held').limit(1).as('mine'),
  ] as const
}

async function statement(db: Kysely<Database>, a: {
  id: number; user: User; trip: HoldTrip; seats: number; limit: RateLimit; counted: boolean; kind?: LocalKind; appUrl: string; holdExpiresAt: string
  checkOnly?: boolean
}) {
  const { id, user, trip, seats, limit } = a
  const priceMinor = seats * trip.price_minor
  const depositMinor = seats * trip.deposit_minor
  const slots = windowSlots(limit.windowMs)
  const at = nowIso()
  const args: HoldArgs = {
    id, userId: user.id, seats, holdExpiresAt: a.holdExpiresAt, priceMinor, depositMinor,
    tripId: trip.id, title: trip.title, tripPriceMinor: trip.price_minor, tripDepositMinor: trip.deposit_minor, currency: trip.currency,
    eclipseId: trip.eclipse_id, siteId: trip.primary_site_id,
    limitKey: limit.key, slotStart: slots.slotStart, limitFrom: slots.from, limitExpiresAt: slots.expiresAt, add: a.counted ? 0 : 1, limit: limit.limit, now: at,
    summary: '', businessDate: '', at, alertSubject: '', alertHtml: '', alertText: '', alertAttachments: '', alertNextAttemptAt: '',
  }
  let rows
  if (a.checkOnly) {
    rows = await checkStatement(db, args)
  } else {
    const mail = T.bookingHeld({
      name: user.name, tripTitle: trip.title, seats, currency: trip.currency, priceMinor, paidMinor: 0, dueMinor: depositMinor,
      bookingUrl: `${a.appUrl}/bookings/${id}`, eclipseKind: a.kind, holdExpiresAt: a.holdExpiresAt, depositMinor, locale: user.locale,
    })
    // The organisers' alert, as alertOrganisers writes it: the same line and mail for every organiser.
    const summary = holdAlertSummary(user.name, seats, id)
    const alert = alertMail({ kind: 'booking', summary, tripTitle: trip.title, at, url: `${a.appUrl}/trips/${trip.id}/manage` })
    const organiserMail = outboxValues({ kind: 'organiser-alert', to: { email: '', name: '' }, tripId: trip.id, bookingId: id, ...alert })
    const travellerMail = outboxValues({ kind: 'booking-held', to: { email: user.email, name: user.name }, locale: user.locale, bookingId: id, tripId: trip.id, ...mail })
    const auditRow = auditValues({ action: 'booking_hold', actorUserId: user.id, detail: { bookingId: id, tripId: trip.id, seats } })
    Object.assign(args, {
      summary, businessDate: businessDate(), alertSubject: organiserMail.subject, alertHtml: organiserMail.html, alertText: organiserMail.text,
      alertAttachments: organiserMail.attachments, alertNextAttemptAt: organiserMail.next_attempt_at,
    })
    for (const c of AUDIT_COLUMNS) args[auditArg(c)] = auditRow[c]
    for (const c of OUTBOX_COLUMNS) args[mailArg(c)] = travellerMail[c]
    rows = await holdStatement(db, args)
  }
  const r = rows[0]!
  if (Number(r.held) === 1) return { held: true as const, id, holdExpiresAt: a.holdExpiresAt, tripSeats: Number(r.tripSeats), claimed: r.claimed === null ? null : Number(r.claimed) }
  return {
    held: false as const,
    slots,
    // Judged only by the statement that counted the request; the take-back is from that statement's slot.
    overLimit: !a.counted && Number(r.limitHits) + Number(r.limitOthers ?? 0) > limit.limit,
    limitOldest: r.limitOldest,
    fresh: !!r.fresh,
    tripSeats: Number(r.tripSeats),
    claimed: r.claimed === null ? null : Number(r.claimed),
    lapsed: !!r.lapsedHold || !!r.lapsedOffer,
    myOffer: !!r.myOffer,
    mine: r.mine ? JSON.parse(r.mine) as { id: number; seats: number } : null,
  }
}
