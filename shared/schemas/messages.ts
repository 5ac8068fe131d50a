/**
 * Plain words for validation messages. Every schema under shared/schemas/ writes its own message for
 * the checks a person meets on a form ("Choose at least one seat"); for any check that has none, the
 * server (server/utils/validate.ts) and the forms (composables/useZodForm.ts) parse with
 * `plainError`, which names the field in words from FIELD_LABELS, never by its key.
 */

/** Field keys in words, as a sentence would use them. */
export const FIELD_LABELS: Record<string, string> = {
  lat: 'latitude', lon: 'longitude', elev: 'height', elevationM: 'height', deltaT: 'ΔT', deltaTSec: 'ΔT',
  radiusKm: 'search radius', limit: 'number of spots', minSunAltitudeDeg: 'lowest Sun altitude', minSeparationKm: 'distance between spots',
  seats: 'seats', name: 'name', email: 'e-mail address', password: 'password', newPassword: 'new password', currentPassword: 'current password',
  repeat: 'repeated password', totp: 'code', code: 'code', token: 'link', role: 'role', notes: 'notes', roadAccess: 'road access',
  capacity: 'capacity', crossesBorder: 'border crossing', pinned: 'pin', cloudOverridePct: 'cloud override', cloudOverrideNote: 'override source',
  eclipseId: 'eclipse', climatologyId: 'climatology', workspaceId: 'workspace', primarySiteId: 'primary site', backupSiteIds: 'backup sites',
  title: 'title', description: 'description', startDate: 'start date', endDate: 'end date', priceMinor: 'price', depositMinor: 'deposit',
  currency: 'currency', balanceDueDate: 'balance due date', cancellationTiers: 'cancellation tiers', until: 'date', refundPct: 'refund percentage',
  minGroupSize: 'minimum group size', meetingPoint: 'meeting point', time: 'meeting time', guideIds: 'guides', items: 'checklist',
  siteId: 'site', amountMinor: 'amount', reason: 'reason', source: 'source', licence: 'licence', years: 'years', timeOfDay: 'time of day',
  month: 'month', offsets: 'cue offsets', margins: 'margins', sigmas: 'margin in σ', endSec: 'end margin', step: 'step', wrap: 'wrapping',
  from: 'first year', to: 'last year', type: 'eclipse type', advanceMs: 'clock step', requireStaffTotp: 'two-factor rule',
  date: 'date', t0Tdt: 't0', id: 'record number', tanF1: 'tan f1', tanF2: 'tan f2', file: 'file', sites: 'sites',
}

/** A key in words: the label, or the key's own words ("radiusKm" → "radius km"). */
export function fieldLabel(path: ReadonlyArray<PropertyKey>): string {
  const key = [...path].reverse().find((k) => typeof k === 'string') as string | undefined
  if (key === undefined) return 'this value'
  return FIELD_LABELS[key] ?? key.replace(/([a-z])([A-Z])/g, '$1 $2').replace(/[_-]+/g, ' ').toLowerCase()
}

const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)
const TYPE_WORDS: Record<string, string> = { number: 'a number', int: 'a whole number', string: 'text', boolean: 'yes or no', array: 'a list', object: 'filled in', date: 'a date' }

interface IssueLike {
  code?: string
  path?: ReadonlyArray<PropertyKey>
  input?: unknown
  expected?: string
  origin?: string
  minimum?: number | bigint
  maximum?: number | bigint
  inclusive?: boolean
  format?: string
  values?: ReadonlyArray<unknown>
  keys?: ReadonlyArray<string>
}

/** A plain message for a zod issue that has none of its own (zod's `error` option, per parse). */
export function plainError(iss: IssueLike): string {
  const label = fieldLabel(iss.path ?? [])
  const n = (v: number | bigint | undefined) => Number(v ?? 0)
  switch (iss.code) {
    case 'invalid_type':
      if (iss.input === undefined || iss.input === null || iss.input === '') return `${cap(label)} is required`
      return `${cap(label)} must be ${TYPE_WORDS[iss.expected ?? ''] ?? 'given'}`
    case 'too_small':
      if (iss.origin === 'string') return n(iss.minimum) <= 1 ? `${cap(label)} is required` : `${cap(label)} needs at least ${n(iss.minimum)} characters`
      if (iss.origin === 'array' || iss.origin === 'set') return `Choose at least ${n(iss.minimum)} for ${label}`
      return `${cap(label)} must be ${iss.inclusive === false ? 'more than' : 'at least'} ${n(iss.minimum)}`
    case 'too_big':
      if (iss.origin === 'string') return `${cap(label)} is too long (at most ${n(iss.maximum)} characters)`
      if (iss.origin === 'array' || iss.origin === 'set') return `${cap(label)}: at most ${n(iss.maximum)}`
      return `${cap(label)} must be ${iss.inclusive === false ? 'less than' : 'at most'} ${n(iss.maximum)}`
    case 'invalid_format':
      return iss.format === 'email' ? 'Enter a valid e-mail address' : `${cap(label)} is not in the expected form`
    case 'invalid_value':
      return iss.values?.length ? `${cap(label)} must be one of: ${iss.values.map(String).join(', ')}` : `${cap(label)} is not one of the choices`
    case 'not_multiple_of':
      return `${cap(label)} must be a whole number`
    case 'unrecognized_keys':
      return `Unexpected ${iss.keys?.length === 1 ? 'field' : 'fields'}: ${(iss.keys ?? []).map((k) => fieldLabel([k])).join(', ')}`
    default:
      return `${cap(label)} is not valid`
  }
}
