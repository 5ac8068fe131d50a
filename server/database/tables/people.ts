import type { ColumnType, Generated } from 'kysely'

type Stamp = ColumnType<string, string | undefined, string>

/** One per booked seat (seat 1 is the booking holder); see migration 0015. `_sealed` columns are AES-256-GCM. */
export interface ParticipantsTable {
  id: Generated<number>
  booking_id: number
  seat: number
  /** As in the passport. */
  full_name: string | null
  /** ISO 3166-1 alpha-2. */
  nationality: string | null
  date_of_birth_sealed: string | null
  passport_number_sealed: string | null
  /** YYYY-MM-DD. */
  passport_expiry: string | null
  /** E.164, sealed. */
  mobile_phone_sealed: string | null
  dietary_sealed: string | null
  medical_sealed: string | null
  mobility_sealed: string | null
  emergency_name: string | null
  emergency_phone_sealed: string | null
  emergency_relation: string | null
  room_type: 'single' | 'double' | 'twin' | 'shared' | null
  room_with: string | null
  updated_at: Stamp
  updated_by: number | null
  erased_at: string | null
}

export interface ParticipantAccessLogTable {
  id: Generated<number>
  trip_id: number
  user_id: number | null
  fields: string
  via: string
  at: ColumnType<string, string | undefined, never>
}

export interface PeopleTables {
  participants: ParticipantsTable
  participant_access_log: ParticipantAccessLogTable
}
