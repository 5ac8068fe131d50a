import { seal, unseal } from '../sealed'

/** The participant fields stored sealed (AES-256-GCM), by column; each bound to its own context. */
export const PARTICIPANT_SEALED = {
  dateOfBirth: 'date_of_birth_sealed',
  passportNumber: 'passport_number_sealed',
  mobilePhone: 'mobile_phone_sealed',
  dietary: 'dietary_sealed',
  medical: 'medical_sealed',
  mobility: 'mobility_sealed',
  emergencyPhone: 'emergency_phone_sealed',
} as const
export type SealedParticipantField = keyof typeof PARTICIPANT_SEALED

/** The context a participant's field is sealed under: a value copied to another seat or field does not open. */
export function participantContext(bookingId: number, seat: number, field: SealedParticipantField): string {
  return `participant:${bookingId}:${seat}:${field}`
}

export function sealParticipantField(bookingId: number, seat: number, field: SealedParticipantField, plain: string | null | undefined): string | null {
  return plain == null || plain === '' ? null : seal(plain, participantContext(bookingId, seat, field))
}

export function unsealParticipantField(bookingId: number, seat: number, field: SealedParticipantField, sealed: string | null): string | null {
  return sealed == null ? null : unseal(sealed, participantContext(bookingId, seat, field))
}
