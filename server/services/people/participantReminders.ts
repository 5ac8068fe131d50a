import type { Kysely, Transaction } from 'kysely'
import { missingFields } from '../../../shared/schemas/participants'
import type { Database, User } from '../../database/schema'
import { audit } from '../audit'
import { businessDate } from '../clock'
import { participantsReminderMail } from '../mailTemplates'
import { enqueueMail } from '../outbox'
import { NotFoundError } from '../planning'
import { ParticipantRuleError, participantFields, participantRows } from './participants'

type Db = Kysely<Database> | Transaction<Database>

/** Days before the trip's first day when travellers with incomplete details are reminded (once each). */
export const PARTICIPANT_REMINDER_DAYS = [45, 14] as const

const DAY_MS = 86_400_000
const addDays = (date: string, days: number) => new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10)

/** What each seat of a booking still lacks (seats with nothing missing left out); the mail puts it in words. */
async function missingBySeat(db: Db, bookingId: number, seatCount: number) {
  const rows = await participantRows(db, [bookingId])
  return Array.from({ length: seatCount }, (_, i) => ({ seat: i + 1, fields: missingFields(participantFields(rows.get(`${bookingId}:${i + 1}`))) }))
    .filter((m) => m.fields.length)
}

async function queueOne(trx: Db, bookingId: number, appUrl: string, dedupeKey: string, daysBefore: number | null): Promise<boolean> {
  if (await trx.selectFrom('outbox').select('id').where('dedupe_key', '=', dedupeKey).executeTakeFirst()) return false
  const b = await trx.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id').innerJoin('trips', 'trips.id', 'bookings.trip_id')
    .select(['bookings.id', 'bookings.seats', 'bookings.trip_id', 'users.name', 'users.email', 'users.locale', 'trips.title', 'trips.start_date'])
    .where('bookings.id', '=', bookingId).executeTakeFirstOrThrow()
  const missing = await missingBySeat(trx, b.id, b.seats)
  if (!missing.length) return false
  await enqueueMail(trx, {
    kind: 'participants-reminder', dedupeKey, to: { email: b.email, name: b.name }, bookingId: b.id, tripId: b.trip_id, locale: b.locale,
    ...participantsReminderMail({ name: b.name, tripTitle: b.title, startDate: b.start_date, daysBefore, missing, bookingUrl: `${appUrl}/bookings/${b.id}`, locale: b.locale }),
  })
  return true
}

/**
 * Housekeeping: confirmed bookings whose participants are incomplete get a reminder 45 days and again
 * 14 days before the trip starts, by the business date (server/services/clock.ts). Each threshold
 * is sent at most once per booking (the outbox's dedupe key); a booking made inside a window gets
 * that window's reminder at once, and none for a window already past.
 */
export async function queueParticipantReminders(db: Kysely<Database>, appUrl: string, today = businessDate()): Promise<number> {
  const rows = await db.selectFrom('bookings').innerJoin('trips', 'trips.id', 'bookings.trip_id')
    .select(['bookings.id', 'bookings.seats', 'trips.start_date'])
    .where('bookings.status', '=', 'confirmed').where('trips.start_date', '>=', today).where('trips.start_date', '<=', addDays(today, PARTICIPANT_REMINDER_DAYS[0])).execute()
  let queued = 0
  for (const r of rows) {
    const days = Math.round((Date.parse(`${r.start_date}T00:00:00Z`) - Date.parse(`${today}T00:00:00Z`)) / DAY_MS)
    const threshold = [...PARTICIPANT_REMINDER_DAYS].reverse().find((t) => days <= t)
    if (threshold === undefined) continue
    const sent = await db.transaction().execute((trx) => queueOne(trx, r.id, appUrl, `participants-${threshold}-${r.id}`, days))
    if (sent) queued++
  }
  return queued
}

/**
 * An organiser's "remind" on the manifest page: one message now, at most one per booking per
 * business day (a second click the same day queues nothing). 400 when every seat is complete.
 */
export async function remindBooking(db: Kysely<Database>, organiser: User, tripId: number, bookingId: number, appUrl: string) {
  const b = await db.selectFrom('bookings').select(['id', 'seats', 'status', 'user_id']).where('id', '=', bookingId).where('trip_id', '=', tripId).executeTakeFirst()
  if (!b || (b.status !== 'confirmed' && b.status !== 'held')) throw new NotFoundError('No such booking on this trip')
  if (!(await missingBySeat(db, b.id, b.seats)).length) throw new ParticipantRuleError({ bookingId: 'Every seat of this booking is complete: nothing to remind of' })
  const queued = await db.transaction().execute(async (trx) => {
    const q = await queueOne(trx, b.id, appUrl, `participants-manual-${businessDate()}-${b.id}`, null)
    if (q) await audit(trx, { action: 'participants_remind', actorUserId: organiser.id, subjectUserId: b.user_id, detail: { bookingId: b.id, tripId } })
    return q
  })
  return { queued, message: queued ? 'Reminder queued: see the outbox' : 'Already reminded today' }
}
