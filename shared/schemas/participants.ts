import { z } from 'zod'
import countries from 'i18n-iso-countries'
import en from 'i18n-iso-countries/langs/en.json'
import { parsePhoneNumberFromString } from 'libphonenumber-js'
import { PLAIN_TEXT, plainTextMessage } from './text'

/**
 * One participant per booked seat (seat 1 is the booking holder). Every field may be left empty and
 * filled in over time; `missingFields` says what a seat still lacks. Shared by the booking page's
 * form and PUT /api/bookings/{id}/participants/{seat}.
 */

countries.registerLocale(en)

export const ROOM_TYPES = ['single', 'double', 'twin', 'shared'] as const
export type RoomType = (typeof ROOM_TYPES)[number]

/** Country names for the nationality list (ISO 3166-1 alpha-2 code → English name), by name. */
export function countryOptions(): Array<{ code: string; name: string }> {
  return Object.entries(countries.getNames('en', { select: 'official' })).map(([code, name]) => ({ code, name: String(name) }))
    .sort((a, b) => a.name.localeCompare(b.name, 'en'))
}
export const countryName = (code: string): string | undefined => countries.getName(code, 'en') ?? undefined

/** An empty text (or only spaces) is "not given yet". */
const blankToNull = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? null : v)
const optional = <T extends z.ZodType>(s: T) => z.preprocess(blankToNull, s.nullable().optional())

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/
/** A real calendar date written YYYY-MM-DD. */
export function isCalendarDate(s: string): boolean {
  if (!ISO_DATE.test(s)) return false
  const [y, m, d] = s.split('-').map(Number) as [number, number, number]
  const t = new Date(Date.UTC(y, m - 1, d))
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d
}
const date = (what: string) => z.string().trim().refine(isCalendarDate, `Enter the ${what} as YYYY-MM-DD`)

const line = (field: string, max: number) => z.string().trim().max(max, `At most ${max} characters`).regex(PLAIN_TEXT, plainTextMessage(field))
/** Free-text notes may span lines, but stay bounded. */
const notes = z.string().trim().max(1000, 'At most 1000 characters')

/** E.164 (+, country code, number), checked with libphonenumber-js's metadata; stored as E.164. */
const phone = z.string().trim().max(40, 'Not a valid phone number').transform((v, ctx) => {
  if (!v.startsWith('+')) {
    ctx.addIssue({ code: 'custom', message: 'Write the number in international form, starting with + and the country code (e.g. +44 20 7946 0958)' })
    return z.NEVER
  }
  const p = parsePhoneNumberFromString(v)
  if (!p || !p.isValid()) {
    ctx.addIssue({ code: 'custom', message: 'Not a valid phone number for its country code' })
    return z.NEVER
  }
  return p.number as string
})

const nationality = z.string().trim().toUpperCase().refine((c) => /^[A-Z]{2}$/.test(c) && countries.isValid(c), {
  message: 'Unknown country code: use the two-letter ISO 3166-1 code (e.g. DE, JP, BR)',
})

export const ParticipantBody = z.object({
  fullName: optional(line('fullName', 120)),
  dateOfBirth: optional(date('date of birth')),
  nationality: optional(nationality),
  passportNumber: optional(z.string().trim().toUpperCase().regex(/^[A-Z0-9]{5,20}$/, 'A passport number is 5–20 letters and digits, as printed')),
  passportExpiry: optional(date('passport expiry date')),
  mobilePhone: optional(phone),
  dietary: optional(notes),
  medical: optional(notes),
  mobility: optional(notes),
  emergencyContact: z.object({
    name: optional(line('emergencyContact.name', 120)),
    phone: optional(phone),
    relation: optional(line('emergencyContact.relation', 60)),
  }).nullable().optional(),
  room: z.object({
    type: optional(z.enum(ROOM_TYPES, { error: 'Choose single, double, twin or shared' })),
    with: optional(line('room.with', 120)),
  }).nullable().optional(),
})
export type ParticipantInput = z.infer<typeof ParticipantBody>

export const SeatParams = z.object({
  id: z.coerce.number().int().positive(),
  seat: z.coerce.number({ error: 'The seat is a number' }).int('The seat is a whole number').positive('Seats count from 1'),
})

export const RemindBody = z.object({ bookingId: z.number({ error: 'Which booking?' }).int().positive() })

/** A participant as the API returns it (every key present; a blank is null). */
export interface ParticipantFields {
  fullName: string | null
  dateOfBirth: string | null
  nationality: string | null
  passportNumber: string | null
  passportExpiry: string | null
  mobilePhone: string | null
  dietary: string | null
  medical: string | null
  mobility: string | null
  emergencyContact: { name: string | null; phone: string | null; relation: string | null }
  room: { type: RoomType | null; with: string | null }
}

/** What makes a seat complete: everything but the three notes (no note means nothing to note). */
export const REQUIRED_FIELDS = [
  'fullName', 'dateOfBirth', 'nationality', 'passportNumber', 'passportExpiry', 'mobilePhone',
  'emergencyContact.name', 'emergencyContact.phone', 'emergencyContact.relation', 'room.type',
] as const
export type RequiredField = (typeof REQUIRED_FIELDS)[number]

export const FIELD_LABELS: Record<RequiredField, string> = {
  fullName: 'full name as in the passport', dateOfBirth: 'date of birth', nationality: 'nationality',
  passportNumber: 'passport number', passportExpiry: 'passport expiry', mobilePhone: 'mobile phone',
  'emergencyContact.name': 'emergency contact\'s name', 'emergencyContact.phone': 'emergency contact\'s phone',
  'emergencyContact.relation': 'emergency contact\'s relation', 'room.type': 'room type',
}

export function missingFields(p: Partial<ParticipantFields> | null | undefined): RequiredField[] {
  const get = (k: RequiredField): unknown => k.split('.').reduce<unknown>((o, part) => (o == null ? null : (o as Record<string, unknown>)[part]), p)
  return REQUIRED_FIELDS.filter((k) => get(k) == null || get(k) === '')
}

/**
 * Many countries ask that a passport stay valid at least six months beyond the stay (a common
 * rule, not a universal one: the destination's and airlines' own rules decide). YYYY-MM-DD, six
 * calendar months after `endDate`, clamped to the month's last day (31 August → 28/29 February).
 */
export const PASSPORT_MONTHS_AFTER_TRIP = 6
export function passportNeededUntil(endDate: string): string {
  const [y, m, d] = endDate.split('-').map(Number) as [number, number, number]
  const month = m - 1 + PASSPORT_MONTHS_AFTER_TRIP
  const ty = y + Math.floor(month / 12), tm = month % 12
  const last = new Date(Date.UTC(ty, tm + 1, 0)).getUTCDate()
  return `${ty}-${String(tm + 1).padStart(2, '0')}-${String(Math.min(d, last)).padStart(2, '0')}`
}
export function passportExpiryProblem(expiry: string, tripEndDate: string): string | null {
  const needed = passportNeededUntil(tripEndDate)
  if (expiry >= needed) return null
  return `The passport expires less than ${PASSPORT_MONTHS_AFTER_TRIP} months after the trip ends (${tripEndDate}): many countries refuse entry on such a passport (valid until ${needed} or later is the common rule; the destination's own rules decide)`
}

/** Whole years of age on `day` (YYYY-MM-DD) for a date of birth. */
export function ageOn(dateOfBirth: string, day: string): number {
  const [by, bm, bd] = dateOfBirth.split('-').map(Number) as [number, number, number]
  const [y, m, d] = day.split('-').map(Number) as [number, number, number]
  return y - by - (m < bm || (m === bm && d < bd) ? 1 : 0)
}
