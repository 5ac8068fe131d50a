import type { Updateable } from 'kysely'
import type { ParticipantsTable } from '../../database/tables/people'

/**
 * What a participant row keeps once its details are erased or purged: the row itself (the seat was
 * booked) and nothing personal. Every column but the ids, the seat and the stamps goes to null.
 */
export function blankParticipant(nowIso: string): Updateable<ParticipantsTable> {
  return {
    full_name: null, nationality: null, date_of_birth_sealed: null, passport_number_sealed: null, passport_expiry: null,
    mobile_phone_sealed: null, dietary_sealed: null, medical_sealed: null, mobility_sealed: null,
    emergency_name: null, emergency_phone_sealed: null, emergency_relation: null, room_type: null, room_with: null,
    updated_at: nowIso, updated_by: null, erased_at: nowIso,
  }
}

/** How many days after a trip's last day its participants' details are purged (NUXT_PERSONAL_DATA_DAYS, default 90). */
export function personalDataDays(): number {
  const n = Number(process.env.NUXT_PERSONAL_DATA_DAYS || 90)
  return Number.isInteger(n) && n >= 0 ? n : 90
}
