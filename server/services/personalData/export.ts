import type { Kysely } from 'kysely'
import type { Database, User } from '../../database/schema'
import { nowIso } from '../clock'
import { SECRET_TOKEN } from '../outbox'
import { PARTICIPANT_SEALED, unsealParticipantField, type SealedParticipantField } from '../people/participantSeal'

const SEALED_FIELDS = Object.keys(PARTICIPANT_SEALED) as SealedParticipantField[]

/**
 * Everything Umbrafield holds about the caller, as one JSON document: the account, their bookings
 * with the participants entered on them (sealed fields opened), the money ledger of those bookings,
 * waitlist places, the e-mails written to them, and what the audit log records of their own account.
 * Only rows tied to this account are read (by user id, by their bookings, or by their address).
 * Reading the sealed participant fields is logged like any other read of them.
 */
export async function exportPersonalData(db: Kysely<Database>, user: User) {
  const totp = await db.selectFrom('user_totp').select(['enabled_at']).where('user_id', '=', user.id).executeTakeFirst()
  const bookings = await db.selectFrom('bookings').innerJoin('trips', 'trips.id', 'bookings.trip_id')
    .select(['bookings.id', 'bookings.trip_id', 'trips.title', 'trips.start_date', 'trips.end_date', 'bookings.seats', 'bookings.status',
      'bookings.price_minor', 'bookings.deposit_minor', 'bookings.paid_minor', 'bookings.refunded_minor', 'bookings.currency',
      'bookings.hold_expires_at', 'bookings.cancel_reason', 'bookings.created_at', 'bookings.updated_at'])
    .where('bookings.user_id', '=', user.id).orderBy('bookings.id').execute()
  const bookingIds = bookings.map((b) => b.id)
  const some = bookingIds.length ? bookingIds : [-1]
  const participants = await db.selectFrom('participants').selectAll().where('booking_id', 'in', some).orderBy('booking_id').orderBy('seat').execute()
  const payments = await db.selectFrom('payments').selectAll().where('booking_id', 'in', some).orderBy('id').execute()
  const refunds = await db.selectFrom('refunds').selectAll().where('booking_id', 'in', some).orderBy('id').execute()
  const waitlist = await db.selectFrom('waitlist').innerJoin('trips', 'trips.id', 'waitlist.trip_id')
    .select(['waitlist.id', 'waitlist.trip_id', 'trips.title', 'waitlist.seats', 'waitlist.status', 'waitlist.offer_expires_at', 'waitlist.created_at'])
    .where('waitlist.user_id', '=', user.id).orderBy('waitlist.id').execute()
  const emails = await db.selectFrom('outbox')
    .select(['id', 'kind', 'to_email', 'subject', 'text', 'status', 'created_at', 'sent_at', 'booking_id', 'trip_id'])
    .where('to_email', '=', user.email)
    .orderBy('id').execute()
  const activity = await db.selectFrom('audit_log').select(['action', 'at', 'actor_user_id'])
    .where((eb) => eb.or([eb('actor_user_id', '=', user.id), eb('subject_user_id', '=', user.id)])).orderBy('id').execute()

  const tripOf = new Map(bookings.map((b) => [b.id, b.trip_id]))
  const readTrips = new Set<number>()
  const participantRows = participants.map((p) => {
    const opened: Record<string, string | null> = {}
    const unreadable: string[] = []
    for (const f of SEALED_FIELDS) {
      try {
        opened[f] = unsealParticipantField(p.booking_id, p.seat, f, p[PARTICIPANT_SEALED[f]])
      } catch {
        // The key that sealed it is no longer configured: say so rather than fail the whole export.
        opened[f] = null
        unreadable.push(f)
      }
    }
    if (!p.erased_at) readTrips.add(tripOf.get(p.booking_id)!)
    return {
      bookingId: p.booking_id, seat: p.seat, fullName: p.full_name, nationality: p.nationality, passportExpiry: p.passport_expiry,
      ...opened, emergencyName: p.emergency_name, emergencyRelation: p.emergency_relation, roomType: p.room_type, roomWith: p.room_with,
      updatedAt: p.updated_at, erasedAt: p.erased_at, ...(unreadable.length ? { unreadable } : {}),
    }
  })
  if (readTrips.size) {
    await db.insertInto('participant_access_log')
      .values([...readTrips].map((tripId) => ({ trip_id: tripId, user_id: user.id, fields: SEALED_FIELDS.join(','), via: 'personal-data-export', at: nowIso() })))
      .execute()
  }

  return {
    format: 'umbrafield-personal-data/1',
    exportedAt: nowIso(),
    account: {
      id: user.id, email: user.email, name: user.name, role: user.role, createdAt: user.created_at,
      emailConfirmedAt: user.email_confirmed_at, twoFactorEnabled: !!totp?.enabled_at,
    },
    bookings: bookings.map((b) => ({
      id: b.id, trip: { id: b.trip_id, title: b.title, startDate: b.start_date, endDate: b.end_date }, seats: b.seats, status: b.status,
      priceMinor: b.price_minor, depositMinor: b.deposit_minor, paidMinor: b.paid_minor, refundedMinor: b.refunded_minor, currency: b.currency,
      holdExpiresAt: b.hold_expires_at, cancelReason: b.cancel_reason, createdAt: b.created_at, updatedAt: b.updated_at,
    })),
    participants: participantRows,
    payments: payments.map((p) => ({
      id: p.id, bookingId: p.booking_id, kind: p.kind, amountMinor: p.amount_minor, currency: p.currency, status: p.status,
      reference: p.payment_intent_id, demo: !!p.demo, createdAt: p.created_at, completedAt: p.completed_at,
    })),
    refunds: refunds.map((r) => ({
      id: r.id, bookingId: r.booking_id, paymentId: r.payment_id, amountMinor: r.amount_minor, reason: r.reason, status: r.status,
      reference: r.stripe_refund_id, createdAt: r.created_at, completedAt: r.completed_at,
    })),
    waitlist: waitlist.map((w) => ({ id: w.id, trip: { id: w.trip_id, title: w.title }, seats: w.seats, status: w.status, offerExpiresAt: w.offer_expires_at, createdAt: w.created_at })),
    // One-time links are never exported: they are stored sealed, and the body keeps only a placeholder.
    emails: emails.map((m) => ({
      id: m.id, kind: m.kind, to: m.to_email, subject: m.subject, text: m.text.split(SECRET_TOKEN).join('[one-time link not kept]'),
      status: m.status, createdAt: m.created_at, sentAt: m.sent_at, bookingId: m.booking_id, tripId: m.trip_id,
    })),
    activity: activity.map((a) => ({ action: a.action, at: a.at, byYou: a.actor_user_id === user.id })),
  }
}
