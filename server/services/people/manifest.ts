import type { Kysely } from 'kysely'
import ExcelJS from 'exceljs'
import { ageOn, missingFields } from '../../../shared/schemas/participants'
import type { Database, User } from '../../database/schema'
import { csvSafeCell, toSafeCsv } from '../csv'
import { NotFoundError } from '../planning'
import { getTripRow, isTripGuide } from '../trips'
import { logAccess, participantFields, participantRows, sensitiveFieldsIn } from './participants'

/**
 * The operator's manifest: every seat of every confirmed booking of a trip, as a participant.
 * Organisers see every field. The trip's own guides see what they need on the day — names, age on
 * the eclipse day, dietary, medical and mobility notes, mobile phones and emergency contacts — and
 * never passport numbers or dates of birth (those keys are left out, not blanked). Every answer that
 * holds passport numbers or medical notes is logged (participant_access_log).
 */

/** The trip, if the caller may see its people: organisers, or a guide assigned to it (others: 404). */
async function tripForStaff(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await getTripRow(db, tripId)
  if (user.role === 'organiser') return trip
  if (user.role === 'guide' && await isTripGuide(db, tripId, user.id)) return trip
  throw new NotFoundError('No such trip')
}

/** Every seat of the trip's confirmed bookings, holder first within each booking, bookings in order. */
async function seats(db: Kysely<Database>, tripId: number) {
  const bookings = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id')
    .select(['bookings.id', 'bookings.seats', 'bookings.user_id', 'users.name', 'users.email'])
    .where('bookings.trip_id', '=', tripId).where('bookings.status', '=', 'confirmed').orderBy('bookings.id').execute()
  const rows = await participantRows(db, bookings.map((b) => b.id))
  return bookings.flatMap((b) => Array.from({ length: b.seats }, (_, i) => {
    const f = participantFields(rows.get(`${b.id}:${i + 1}`))
    const missing = missingFields(f)
    return { bookingId: b.id, seat: i + 1, holder: { name: b.name, email: b.email }, complete: missing.length === 0, missing, f }
  }))
}

export async function manifest(db: Kysely<Database>, user: User, tripId: number, via = 'manifest') {
  const trip = await tripForStaff(db, user, tripId)
  const all = await seats(db, tripId)
  const day = trip.eclipse_id
  const data = user.role === 'organiser'
    ? all.map((s) => ({ bookingId: s.bookingId, seat: s.seat, holder: s.holder, complete: s.complete, missing: s.missing, ...s.f, ageOnTheDay: s.f.dateOfBirth ? ageOn(s.f.dateOfBirth, day) : null }))
    : all.map((s) => ({
        bookingId: s.bookingId, seat: s.seat, complete: s.complete, fullName: s.f.fullName,
        ageOnTheDay: s.f.dateOfBirth ? ageOn(s.f.dateOfBirth, day) : null,
        dietary: s.f.dietary, medical: s.f.medical, mobility: s.f.mobility, mobilePhone: s.f.mobilePhone, emergencyContact: s.f.emergencyContact,
      }))
  await logAccess(db, trip.id, user.id, sensitiveFieldsIn(data), via)
  return {
    trip: { id: trip.id, title: trip.title, startDate: trip.start_date, endDate: trip.end_date, eclipseDate: day },
    data,
    meta: { complete: all.filter((s) => s.complete).length, total: all.length },
  }
}

/** One flat row per seat, for the organisers' CSV and XLSX (organisers only: the route checks the role). */
async function flatRows(db: Kysely<Database>, user: User, tripId: number, via: string) {
  const m = await manifest(db, user, tripId, via)
  if (user.role !== 'organiser') throw new NotFoundError('No such trip')
  return { title: m.trip.title, rows: (m.data as Array<Awaited<ReturnType<typeof seats>>[number]['f'] & { bookingId: number; seat: number; holder: { name: string; email: string }; complete: boolean; ageOnTheDay: number | null }>).map((p) => ({
    booking_id: p.bookingId, seat: p.seat, booked_by: p.holder.name, booked_by_email: p.holder.email, complete: p.complete ? 'yes' : 'no',
    full_name: p.fullName ?? '', date_of_birth: p.dateOfBirth ?? '', age_on_the_day: p.ageOnTheDay ?? '', nationality: p.nationality ?? '',
    passport_number: p.passportNumber ?? '', passport_expiry: p.passportExpiry ?? '', mobile_phone: p.mobilePhone ?? '',
    dietary: p.dietary ?? '', medical: p.medical ?? '', mobility: p.mobility ?? '',
    emergency_name: p.emergencyContact.name ?? '', emergency_phone: p.emergencyContact.phone ?? '', emergency_relation: p.emergencyContact.relation ?? '',
    room_type: p.room.type ?? '', room_with: p.room.with ?? '',
  })) }
}

const HEADERS = ['booking_id', 'seat', 'booked_by', 'booked_by_email', 'complete', 'full_name', 'date_of_birth', 'age_on_the_day', 'nationality', 'passport_number', 'passport_expiry', 'mobile_phone', 'dietary', 'medical', 'mobility', 'emergency_name', 'emergency_phone', 'emergency_relation', 'room_type', 'room_with']

/** The manifest as spreadsheet-safe CSV (every text cell through csv.ts's escaping). */
export async function manifestCsv(db: Kysely<Database>, user: User, tripId: number): Promise<string> {
  const { rows } = await flatRows(db, user, tripId, 'manifest.csv')
  if (!rows.length) return `${HEADERS.join(',')}\r\n`
  return toSafeCsv(rows)
}

/**
 * The manifest as an XLSX workbook. Every cell is written as a plain value (text or number), never
 * as a formula; text that a spreadsheet would read as one when re-saved as CSV gets the same
 * leading apostrophe as the CSV export.
 */
export async function manifestXlsx(db: Kysely<Database>, user: User, tripId: number): Promise<Buffer> {
  const { title, rows } = await flatRows(db, user, tripId, 'manifest.xlsx')
  const wb = new ExcelJS.Workbook()
  wb.creator = 'Umbrafield'
  const ws = wb.addWorksheet('Manifest')
  ws.addRow(HEADERS).font = { bold: true }
  for (const r of rows) ws.addRow(HEADERS.map((h) => csvSafeCell((r as Record<string, unknown>)[h])))
  ws.columns.forEach((c) => { c.width = 18 })
  ws.views = [{ state: 'frozen', ySplit: 1 }]
  wb.title = String(csvSafeCell(`Manifest — ${title}`))
  return Buffer.from(await wb.xlsx.writeBuffer())
}

/** Organisers: who read passport numbers or medical notes on this trip, newest first (at most 500). */
export async function accessLog(db: Kysely<Database>, tripId: number) {
  await getTripRow(db, tripId)
  const rows = await db.selectFrom('participant_access_log').leftJoin('users', 'users.id', 'participant_access_log.user_id')
    .select(['participant_access_log.id', 'participant_access_log.at', 'participant_access_log.fields', 'participant_access_log.via', 'participant_access_log.user_id', 'users.name', 'users.role'])
    .where('participant_access_log.trip_id', '=', tripId).orderBy('participant_access_log.id', 'desc').limit(500).execute()
  const total = await db.selectFrom('participant_access_log').select((eb) => eb.fn.countAll<number>().as('n')).where('trip_id', '=', tripId).executeTakeFirstOrThrow()
  return {
    data: rows.map((r) => ({ id: r.id, at: r.at, fields: r.fields.split(','), via: r.via, user: r.user_id === null ? null : { id: r.user_id, name: r.name, role: r.role } })),
    meta: { total: Number(total.n), shown: rows.length },
  }
}

/**
 * The guide's emergency sheet for the countdown (kept on the device for offline use; cleared on
 * sign-out): names, medical and mobility notes, emergency contacts. Logged as a read of medical notes.
 */
export async function emergencySheet(db: Kysely<Database>, user: User, tripId: number) {
  const trip = await tripForStaff(db, user, tripId)
  const all = await seats(db, tripId)
  const data = all.map((s) => ({
    bookingId: s.bookingId, seat: s.seat, name: s.f.fullName ?? `${s.holder.name} — seat ${s.seat} (name not given yet)`,
    mobilePhone: s.f.mobilePhone, medical: s.f.medical, mobility: s.f.mobility, emergencyContact: s.f.emergencyContact,
  }))
  await logAccess(db, trip.id, user.id, sensitiveFieldsIn(data), 'emergency-sheet')
  return { trip: { id: trip.id, title: trip.title }, data, meta: { total: data.length } }
}

/** Organisers: who sleeps where, for the trip's PDF pack (names and room wishes; nothing sealed). */
export async function roomingList(db: Kysely<Database>, tripId: number) {
  const all = await seats(db, tripId)
  return all.map((s) => ({ bookingId: s.bookingId, seat: s.seat, name: s.f.fullName ?? `${s.holder.name} — seat ${s.seat}`, roomType: s.f.room.type, with: s.f.room.with }))
}
