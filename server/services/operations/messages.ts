import type { Kysely } from 'kysely'
import type { Database, User } from '../../database/schema'
import type { TripMessageInput } from '../../../shared/schemas/operations'
import { audit } from '../audit'
import { nowIso } from '../clock'
import { enqueueMail } from '../outbox'
import { NotFoundError } from '../planning'
import { getTripRow } from '../trips'
import { groupMessageMail } from './operationsMail'

/** Whose bookings a message reaches: 'confirmed' ones, or 'all' active ones (held or confirmed). */
const statusesFor = (to: TripMessageInput['to']) => (to === 'confirmed' ? ['confirmed' as const] : ['held' as const, 'confirmed' as const])

async function audienceOf(db: Kysely<Database>, tripId: number, to: TripMessageInput['to']) {
  return db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id as bookingId', 'bookings.user_id as userId', 'users.name', 'users.email'])
    .where('bookings.trip_id', '=', tripId).where('bookings.status', 'in', statusesFor(to)).orderBy('bookings.id').execute()
}

/** One mail per person (a traveller with two active bookings gets it once), linking their first booking. */
function mailsFor(audience: Awaited<ReturnType<typeof audienceOf>>) {
  const seen = new Map<number, (typeof audience)[number]>()
  for (const a of audience) if (!seen.has(a.userId)) seen.set(a.userId, a)
  return [...seen.values()]
}

/** What would go out, without sending: the recipients and the mail as the first of them would get it. */
export async function previewTripMessage(db: Kysely<Database>, user: User, tripId: number, m: TripMessageInput, appUrl: string) {
  const trip = await getTripRow(db, tripId)
  const people = mailsFor(await audienceOf(db, tripId, m.to))
  const sample = people[0] ?? { name: 'Traveller', bookingId: 0 }
  const mail = groupMessageMail({ tripTitle: trip.title, subject: m.subject, body: m.body, name: sample.name, organiser: user.name, bookingUrl: `${appUrl}/bookings/${sample.bookingId}` })
  return { recipients: people.length, to: people.map((p) => p.name), preview: { subject: mail.subject, html: mail.html, text: mail.text } }
}

/**
 * Sends a message to the group: the message, who it went to and one outbox mail per person are
 * written in one transaction, so either all of it is queued or none.
 */
export async function sendTripMessage(db: Kysely<Database>, user: User, tripId: number, m: TripMessageInput, appUrl: string) {
  const trip = await getTripRow(db, tripId)
  return db.transaction().execute(async (trx) => {
    const audience = await audienceOf(trx as unknown as Kysely<Database>, tripId, m.to)
    const people = mailsFor(audience)
    const msg = await trx.insertInto('trip_messages').values({ trip_id: tripId, author_id: user.id, subject: m.subject, body: m.body, audience: m.to, recipients: people.length, created_at: nowIso() })
      .returning('id').executeTakeFirstOrThrow()
    if (audience.length) await trx.insertInto('trip_message_recipients').values(audience.map((a) => ({ message_id: msg.id, booking_id: a.bookingId }))).execute()
    for (const p of people) {
      const mail = groupMessageMail({ tripTitle: trip.title, subject: m.subject, body: m.body, name: p.name, organiser: user.name, bookingUrl: `${appUrl}/bookings/${p.bookingId}` })
      await enqueueMail(trx, { kind: 'trip-message', to: { email: p.email, name: p.name }, bookingId: p.bookingId, tripId, ...mail })
    }
    await audit(trx, { action: 'trip_message', actorUserId: user.id, detail: { tripId, messageId: msg.id, to: m.to, recipients: people.length } })
    return { id: msg.id, queued: people.length }
  })
}

/** The trip's messages, newest first, for its organisers' history. */
export async function tripMessages(db: Kysely<Database>, tripId: number) {
  await getTripRow(db, tripId)
  const rows = await db.selectFrom('trip_messages').leftJoin('users', 'users.id', 'trip_messages.author_id')
    .select(['trip_messages.id', 'trip_messages.subject', 'trip_messages.body', 'trip_messages.audience', 'trip_messages.recipients', 'trip_messages.created_at', 'users.name as author'])
    .where('trip_messages.trip_id', '=', tripId).orderBy('trip_messages.id', 'desc').execute()
  return {
    data: rows.map((r) => ({ id: r.id, subject: r.subject, body: r.body, to: r.audience, recipients: r.recipients, sentAt: r.created_at, author: r.author ?? null })),
    meta: { total: rows.length },
  }
}

/** The messages a booking received, newest first: its traveller's own, or any for organisers (else 404). */
export async function bookingMessages(db: Kysely<Database>, user: User, bookingId: number) {
  const b = await db.selectFrom('bookings').select(['id', 'user_id']).where('id', '=', bookingId).executeTakeFirst()
  if (!b || (b.user_id !== user.id && user.role !== 'organiser')) throw new NotFoundError('No such booking')
  const rows = await db.selectFrom('trip_message_recipients').innerJoin('trip_messages', 'trip_messages.id', 'trip_message_recipients.message_id')
    .leftJoin('users', 'users.id', 'trip_messages.author_id')
    .select(['trip_messages.id', 'trip_messages.subject', 'trip_messages.body', 'trip_messages.created_at', 'users.name as author'])
    .where('trip_message_recipients.booking_id', '=', bookingId).orderBy('trip_messages.id', 'desc').execute()
  return { data: rows.map((r) => ({ id: r.id, subject: r.subject, body: r.body, sentAt: r.created_at, author: r.author ?? null })), meta: { total: rows.length } }
}
