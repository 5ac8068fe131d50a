import type { Kysely, Selectable, Transaction } from 'kysely'
import {
  missingFields, passportExpiryProblem, passportNeededUntil,
  type ParticipantFields, type ParticipantInput, type RoomType,
} from '../../../shared/schemas/participants'
import type { Database, User } from '../../database/schema'
import type { ParticipantsTable } from '../../database/tables/people'
import { audit } from '../audit'
import { bookingFor, BookingStateError, type BookingRow } from '../bookings'
import { businessDate, nowIso } from '../clock'
import { NotFoundError } from '../planning'
import { SealError } from '../sealed'
import { PARTICIPANT_SEALED, sealParticipantField, unsealParticipantField, type SealedParticipantField } from './participantSeal'

type Db = Kysely<Database> | Transaction<Database>
export type ParticipantRow = Selectable<ParticipantsTable>

/** Bad participant details: a 400 naming each field. */
export class ParticipantRuleError extends Error {
  constructor(public fields: Record<string, string>) { super(Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join('; ')) }
}

/** A sealed field opened; a value whose key is gone (or was tampered with) reads as not given, never as a 500. */
function open(row: ParticipantRow, field: SealedParticipantField): string | null {
  try {
    return unsealParticipantField(row.booking_id, row.seat, field, row[PARTICIPANT_SEALED[field]])
  } catch (e) {
    if (e instanceof SealError) {
      console.warn(`[umbrafield] participant ${row.booking_id}/${row.seat} ${field}: ${e.message}`)
      return null
    }
    throw e
  }
}

/** Every field of one seat, opened (blank seats: every field null). */
export function participantFields(row: ParticipantRow | undefined): ParticipantFields {
  if (!row || row.erased_at) {
    return {
      fullName: null, dateOfBirth: null, nationality: null, passportNumber: null, passportExpiry: null, mobilePhone: null,
      dietary: null, medical: null, mobility: null, emergencyContact: { name: null, phone: null, relation: null }, room: { type: null, with: null },
    }
  }
  return {
    fullName: row.full_name, dateOfBirth: open(row, 'dateOfBirth'), nationality: row.nationality,
    passportNumber: open(row, 'passportNumber'), passportExpiry: row.passport_expiry, mobilePhone: open(row, 'mobilePhone'),
    dietary: open(row, 'dietary'), medical: open(row, 'medical'), mobility: open(row, 'mobility'),
    emergencyContact: { name: row.emergency_name, phone: open(row, 'emergencyPhone'), relation: row.emergency_relation },
    room: { type: row.room_type as RoomType | null, with: row.room_with },
  }
}

/** The participant rows of these bookings, by booking and seat (seats beyond a booking's count are ignored by callers). */
export async function participantRows(db: Db, bookingIds: number[]): Promise<Map<string, ParticipantRow>> {
  if (!bookingIds.length) return new Map()
  const rows = await db.selectFrom('participants').selectAll().where('booking_id', 'in', bookingIds).execute()
  return new Map(rows.map((r) => [`${r.booking_id}:${r.seat}`, r]))
}

/**
 * Records who read passport numbers or medical notes, when, on which trip and through what. Called
 * only when such values were actually in the answer.
 */
export async function logAccess(db: Db, tripId: number, userId: number, fields: string[], via: string): Promise<void> {
  if (!fields.length) return
  await db.insertInto('participant_access_log').values({ trip_id: tripId, user_id: userId, fields: fields.join(','), via, at: nowIso() }).execute()
}

/** Which of the logged fields (passport numbers, medical notes) carry a value in these answers. */
export function sensitiveFieldsIn(list: Array<Partial<Pick<ParticipantFields, 'passportNumber' | 'medical'>>>): string[] {
  const out: string[] = []
  if (list.some((p) => p.passportNumber)) out.push('passportNumber')
  if (list.some((p) => p.medical)) out.push('medical')
  return out
}

async function tripOf(db: Db, tripId: number) {
  return db.selectFrom('trips').select(['id', 'title', 'start_date', 'end_date', 'eclipse_id']).where('id', '=', tripId).executeTakeFirstOrThrow()
}

function seatView(seat: number, row: ParticipantRow | undefined) {
  const f = participantFields(row)
  const missing = missingFields(f)
  return { seat, complete: missing.length === 0, missing, ...f, updatedAt: row && !row.erased_at ? row.updated_at : null }
}

/**
 * GET /api/bookings/{id}/participants: one entry per booked seat (seat 1 the holder), filled or not.
 * The booking's traveller and organisers; anyone else gets 404. Reads are logged like the manifest's.
 */
export async function listParticipants(db: Kysely<Database>, user: User, bookingId: number) {
  const b = await bookingFor(db, user, bookingId)
  const trip = await tripOf(db, b.trip_id)
  const rows = await participantRows(db, [b.id])
  const data = Array.from({ length: b.seats }, (_, i) => seatView(i + 1, rows.get(`${b.id}:${i + 1}`)))
  await logAccess(db, trip.id, user.id, sensitiveFieldsIn(data), 'booking')
  return {
    data,
    meta: {
      seats: b.seats, complete: data.filter((d) => d.complete).length, bookingStatus: b.status, writable: writable(b),
      trip: { id: trip.id, title: trip.title, startDate: trip.start_date, endDate: trip.end_date, passportValidUntil: passportNeededUntil(trip.end_date) },
    },
  }
}

/** Details can be given while a booking is live (held or confirmed); a cancelled or expired one is closed. */
const writable = (b: BookingRow) => b.status === 'held' || b.status === 'confirmed'

/**
 * PUT /api/bookings/{id}/participants/{seat}: replaces the seat's details (a field left out is
 * cleared). The booking's traveller and organisers only (bookingFor: anyone else 404); a seat
 * beyond the booking's count is 404; a cancelled or expired booking is 409. Checks that need the
 * trip: the passport's six months after the trip's end, a date of birth not in the future.
 */
export async function putParticipant(db: Kysely<Database>, user: User, bookingId: number, seat: number, input: ParticipantInput) {
  const b = await bookingFor(db, user, bookingId)
  if (seat > b.seats) throw new NotFoundError(`No such seat: this booking has ${b.seats} seat${b.seats > 1 ? 's' : ''}`)
  if (!writable(b)) throw new BookingStateError(`This booking is ${b.status}: its participants can no longer be changed`)
  const trip = await tripOf(db, b.trip_id)
  const problems: Record<string, string> = {}
  if (input.passportExpiry) {
    const p = passportExpiryProblem(input.passportExpiry, trip.end_date)
    if (p) problems.passportExpiry = p
  }
  if (input.dateOfBirth) {
    if (input.dateOfBirth > businessDate()) problems.dateOfBirth = 'A date of birth cannot be in the future'
    else if (input.dateOfBirth < '1900-01-01') problems.dateOfBirth = 'Check the year of birth'
  }
  if (Object.keys(problems).length) throw new ParticipantRuleError(problems)
  const s = (field: SealedParticipantField, v: string | null | undefined) => sealParticipantField(b.id, seat, field, v)
  const values = {
    full_name: input.fullName ?? null, nationality: input.nationality ?? null,
    date_of_birth_sealed: s('dateOfBirth', input.dateOfBirth), passport_number_sealed: s('passportNumber', input.passportNumber),
    passport_expiry: input.passportExpiry ?? null, mobile_phone_sealed: s('mobilePhone', input.mobilePhone),
    dietary_sealed: s('dietary', input.dietary), medical_sealed: s('medical', input.medical), mobility_sealed: s('mobility', input.mobility),
    emergency_name: input.emergencyContact?.name ?? null, emergency_phone_sealed: s('emergencyPhone', input.emergencyContact?.phone),
    emergency_relation: input.emergencyContact?.relation ?? null,
    room_type: input.room?.type ?? null, room_with: input.room?.with ?? null,
    // Details given again after an erasure are new details: the row reads normally from now on.
    updated_at: nowIso(), updated_by: user.id, erased_at: null,
  }
  const row = await db.transaction().execute(async (trx) => {
    await trx.insertInto('participants').values({ booking_id: b.id, seat, ...values })
      .onConflict((oc) => oc.columns(['booking_id', 'seat']).doUpdateSet(values)).execute()
    await audit(trx, { action: 'participant_update', actorUserId: user.id, subjectUserId: b.user_id, detail: { bookingId: b.id, seat } })
    return trx.selectFrom('participants').selectAll().where('booking_id', '=', b.id).where('seat', '=', seat).executeTakeFirstOrThrow()
  })
  return seatView(seat, row)
}
