import type { Kysely } from 'kysely'
import type { Database } from '../schema'
import { nowIso } from '../../services/clock'
import { sealParticipantField, type SealedParticipantField } from '../../services/people/participantSeal'

const addYears = (date: string, years: number) => `${Number(date.slice(0, 4)) + years}${date.slice(4)}`

/**
 * Demo: invented participants on the demo traveller's bookings, so the manifest has something to
 * show. The first seat is complete, the second only started. Names say "demo"; the phone numbers lie
 * in Australian ranges set aside for fiction (0491 570 156–159, 02 5550 xxxx); passport numbers
 * begin with DEMO. Seats already given (or erased) are left alone, so the seed stays idempotent.
 */
export async function seedDemoParticipants(db: Kysely<Database>): Promise<void> {
  const bookings = await db.selectFrom('bookings').innerJoin('users', 'users.id', 'bookings.user_id').innerJoin('trips', 'trips.id', 'bookings.trip_id')
    .select(['bookings.id', 'bookings.seats', 'trips.end_date']).where('users.email', '=', 'traveller2@umbrafield.test').where('bookings.status', '=', 'confirmed').execute()
  for (const b of bookings) {
    const s = (seat: number, field: SealedParticipantField, v: string | null) => sealParticipantField(b.id, seat, field, v)
    const seats = [
      {
        seat: 1, full_name: 'Samir Okafor (demo)', nationality: 'NG', passport_expiry: addYears(b.end_date, 6), room_type: 'double' as const, room_with: 'Lina Okafor (demo)',
        emergency_name: 'Ada Okafor (demo)', emergency_relation: 'sister',
        date_of_birth_sealed: s(1, 'dateOfBirth', '1979-04-11'), passport_number_sealed: s(1, 'passportNumber', 'DEMO4471902'),
        mobile_phone_sealed: s(1, 'mobilePhone', '+61491570156'), dietary_sealed: s(1, 'dietary', 'Demo: vegetarian'),
        medical_sealed: s(1, 'medical', 'Demo: mild asthma, carries an inhaler'), mobility_sealed: null,
        emergency_phone_sealed: s(1, 'emergencyPhone', '+61255500123'),
      },
      {
        seat: 2, full_name: 'Lina Okafor (demo)', nationality: 'GB', passport_expiry: null, room_type: 'double' as const, room_with: 'Samir Okafor (demo)',
        emergency_name: null, emergency_relation: null,
        date_of_birth_sealed: s(2, 'dateOfBirth', '1983-09-27'), passport_number_sealed: null,
        mobile_phone_sealed: s(2, 'mobilePhone', '+61491570157'), dietary_sealed: null, medical_sealed: null,
        mobility_sealed: s(2, 'mobility', 'Demo: no long walks on sand (knee)'), emergency_phone_sealed: null,
      },
    ].filter((p) => p.seat <= b.seats)
    for (const p of seats) {
      await db.insertInto('participants').values({ booking_id: b.id, ...p, updated_at: nowIso(), updated_by: null })
        .onConflict((oc) => oc.columns(['booking_id', 'seat']).doNothing()).execute()
    }
  }
}
