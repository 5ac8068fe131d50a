import { releaseSeats } from '../seatCounter'
import { sql, type ExpressionBuilder, type Kysely } from 'kysely'
import type Stripe from 'stripe'
import { isPostgres } from '../../database/dialect'
import type { Database, User } from '../../database/schema'
import { ROLE_CHANGE_LOCK, unusablePasswordHash } from '../accounts'
import { audit } from '../audit'
import { BookingStateError, cancelBooking, type BookingConfig } from '../bookings'
import { businessDate, nowIso } from '../clock'
import { blankParticipant } from './blank'

/** The last organiser would leave nobody able to run the company: refused (409 `last_organiser`). */
export class LastOrganiserEraseError extends Error {
  constructor() { super('You are the last organiser: make someone else an organiser first, then erase your account.') }
}

/**
 * A confirmed booking on a trip that has not ended yet: erasing would leave a paid seat with nobody
 * on it, and cancelling it moves money (the cancellation tiers), which the traveller should choose
 * knowingly. Refused (409 `booking_active`): cancel the booking first, or wait until the trip is over.
 */
export class ActiveBookingError extends Error {
  constructor(public bookingIds: number[]) {
    super('You have a confirmed booking on a trip that has not ended yet: cancel it first (the cancellation terms apply), or erase your data once the trip is over.')
  }
}

/** The address an erased account is left with: unique, and in a domain that can never receive mail (RFC 2606). */
export const erasedEmail = (userId: number) => `erased-${userId}@erased.invalid`
export const ERASED_NAME = 'Erased account'
const ERASED_BODY = '(erased at the recipient\'s request)'

export interface EraseResult {
  holdsReleased: number
  participantsBlanked: number
  waitlistLeft: number
  emailsScrubbed: number
}

/** Confirmed bookings of `userId` on trips whose last day is today or later. */
async function activeConfirmed(db: Kysely<Database>, userId: number): Promise<number[]> {
  const rows = await db.selectFrom('bookings').innerJoin('trips', 'trips.id', 'bookings.trip_id').select('bookings.id')
    .where('bookings.user_id', '=', userId).where('bookings.status', '=', 'confirmed').where('trips.end_date', '>=', businessDate()).execute()
  return rows.map((r) => r.id)
}

async function assertNotLastOrganiser(db: Kysely<Database>, user: User) {
  const me = await db.selectFrom('users').select('role').where('id', '=', user.id).executeTakeFirst()
  if (me?.role !== 'organiser') return
  const [{ n }] = await db.selectFrom('users').select((eb) => eb.fn.countAll<number>().as('n'))
    .where('role', '=', 'organiser').where('erased_at', 'is', null).execute() as [{ n: number }]
  if (Number(n) <= 1) throw new LastOrganiserEraseError()
}

/**
 * Erases the personal data of the caller's account, at their request (the password was checked by
 * the route). In order:
 *
 * 1. Refuse when they are the last organiser, or hold a confirmed booking on a trip not yet over.
 * 2. Release their held bookings as a cancellation would (seats back on sale, the waitlist offered,
 *    open checkouts expired).
 * 3. In one transaction: blank every participant on their bookings; leave waitlists; scrub the
 *    e-mails written to them (bodies, address and name; unsent ones are given up); drop their
 *    sign-in state (two-factor, recovery codes, links, throttling rows, the Stripe customer link,
 *    guide assignments); take their address out of audit details; and anonymise the account
 *    (placeholder name and an address that cannot receive mail, a password nobody knows, traveller
 *    role, every session ended). Bookings, payments and refunds keep their amounts: accounting law
 *    keeps those. The audit entry says what was erased in counts only.
 */
export async function erasePersonalData(db: Kysely<Database>, stripe: Stripe | null, user: User, cfg: BookingConfig,
  hashPassword: (plain: string) => Promise<string>): Promise<EraseResult> {
  await assertNotLastOrganiser(db, user)
  const active = await activeConfirmed(db, user.id)
  if (active.length) throw new ActiveBookingError(active)

  const held = await db.selectFrom('bookings').select('id').where('user_id', '=', user.id).where('status', '=', 'held').execute()
  let holdsReleased = 0
  for (const b of held) {
    try {
      await cancelBooking(db, stripe, user, b.id, cfg)
      holdsReleased++
    } catch (e) {
      // It lapsed or was paid meanwhile: the checks in the transaction below see what it became.
      if (!(e instanceof BookingStateError)) throw e
    }
  }
  const unusable = await unusablePasswordHash(hashPassword)

  return db.transaction().execute(async (trx) => {
    // Serialised with role changes (PostgreSQL: their advisory lock; SQLite: BEGIN IMMEDIATE), so an
    // organiser erasing while another is demoted cannot leave none.
    if (isPostgres(trx)) await sql`select pg_advisory_xact_lock(${ROLE_CHANGE_LOCK})`.execute(trx)
    await assertNotLastOrganiser(trx, user)
    const still = await trx.selectFrom('bookings').select('id').where('user_id', '=', user.id).where('status', '=', 'held').execute()
    if (still.length) throw new BookingStateError('A booking changed meanwhile; reload and try again')
    const nowActive = await activeConfirmed(trx, user.id)
    if (nowActive.length) throw new ActiveBookingError(nowActive)

    const now = nowIso()
    const current = await trx.selectFrom('users').select(['email', 'role', 'name']).where('id', '=', user.id).executeTakeFirstOrThrow()
    const bookingIds = (await trx.selectFrom('bookings').select('id').where('user_id', '=', user.id).execute()).map((b) => b.id)
    const some = bookingIds.length ? bookingIds : [-1]
    const participants = await trx.updateTable('participants').set(blankParticipant(now)).where('booking_id', 'in', some).executeTakeFirst()
    // Seats offered to them go back to the trip's counter (they count there until taken up or lapsed).
    const offered = await trx.selectFrom('waitlist').select(['trip_id', 'seats']).where('user_id', '=', user.id).where('status', '=', 'offered').execute()
    const waitlist = await trx.updateTable('waitlist').set({ status: 'cancelled' })
      .where('user_id', '=', user.id).where('status', 'in', ['waiting', 'offered']).executeTakeFirst()
    for (const o of offered) await releaseSeats(trx, o.trip_id, o.seats)
    // Mail to them; mail to staff about their booking is the staff's record and stays.
    const mine = (eb: ExpressionBuilder<Database, 'outbox'>) => eb('to_email', '=', current.email)
    // A message not yet sent is given up: it would carry their name and address out after erasure.
    await trx.updateTable('outbox').set({ status: 'failed', last_error: 'not sent: the recipient had their data erased', sending_since: null })
      .where(mine).where('status', 'in', ['queued', 'sending']).execute()
    const emails = await trx.updateTable('outbox')
      .set({ to_email: erasedEmail(user.id), to_name: '', subject: ERASED_BODY, html: ERASED_BODY, text: ERASED_BODY, attachments: '[]', sealed_secret: null })
      .where(mine).executeTakeFirst()
    // Staff copies about their bookings (organisers' alerts and digests) keep the event, not the person:
    // their name and address are replaced in the mail and in the in-app alerts.
    const scrub = (col: string) => sql<string>`replace(replace(${sql.ref(col)}, ${current.email}, ${ERASED_NAME}), ${current.name}, ${ERASED_NAME})`
    const aboutThem = (eb: ExpressionBuilder<Database, 'outbox'>) => eb.or([
      eb('booking_id', 'in', some),
      eb('text', 'like', `%${current.email.replace(/[%_\\]/g, '_')}%`),
    ])
    await trx.updateTable('outbox').set({ subject: scrub('subject'), text: scrub('text'), html: scrub('html') })
      .where('to_email', '!=', erasedEmail(user.id)).where(aboutThem).execute()
    await trx.updateTable('organiser_alerts').set({ summary: scrub('summary') }).where('booking_id', 'in', some).execute()
    // Audit details that name the address (failed sign-ins, reset requests) keep the event, not the address.
    await trx.updateTable('audit_log').set((eb) => ({ detail: eb.fn<string>('replace', ['detail', sql.val(JSON.stringify(current.email)), sql.val('"[erased]"')]) }))
      // (LIKE's wildcards in the address match any character there: a wider net; replace() is exact.)
      .where('detail', 'like', `%${current.email.replace(/[%_\\]/g, '_')}%`).execute()
    // Throttling rows by address, by current-password key and by two-factor lock key (they hold client addresses).
    await trx.deleteFrom('sign_in_failures').where('email', 'in', [current.email, `password:${user.id}`, `totp:${user.id}`]).execute()
    await trx.deleteFrom('totp_recovery_codes').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('user_totp').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('account_tokens').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('email_confirmations').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('stripe_customers').where('user_id', '=', user.id).execute()
    await trx.deleteFrom('trip_guides').where('user_id', '=', user.id).execute()
    await trx.updateTable('users').set((eb) => ({
      email: erasedEmail(user.id), name: ERASED_NAME, password_hash: unusable, role: 'traveller', email_confirmed_at: null, erased_at: now,
      session_version: eb('session_version', '+', 1),
    })).where('id', '=', user.id).execute()
    const result: EraseResult = {
      holdsReleased,
      participantsBlanked: Number(participants.numUpdatedRows),
      waitlistLeft: Number(waitlist.numUpdatedRows),
      emailsScrubbed: Number(emails.numUpdatedRows),
    }
    // No ip, no name, no address: the entry itself holds nothing personal.
    await audit(trx, { action: 'account_erased', actorUserId: user.id, subjectUserId: user.id, detail: { formerRole: current.role, bookingsKept: bookingIds.length, ...result } })
    return result
  }).then(async (result) => {
    await flushSqliteLog(db)
    return result
  })
}

/**
 * SQLite keeps the pages as they were before a change in its write-ahead log until a checkpoint
 * copies them back: checkpoint now and empty the log, so the erased text is gone from both files
 * (with secure_delete on, server/database/connection.ts). Readers still open may keep it waiting;
 * the next checkpoint catches up. PostgreSQL reclaims dead rows with its own (auto)vacuum.
 */
export async function flushSqliteLog(db: Kysely<Database>): Promise<void> {
  if (isPostgres(db)) return
  await sql`pragma wal_checkpoint(TRUNCATE)`.execute(db)
}
