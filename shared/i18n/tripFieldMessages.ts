/**
 * The field messages a traveller meets on the booking box and the participant forms come from the
 * shared zod schemas and the server, in English. Pages in another language recognise them here by
 * their wording and say them again from their own message key, with the same figures.
 * Returns the key (under participant.error in trip.json) and its named values, or null for a
 * message it does not know (which is then shown as it came). Dates are left as YYYY-MM-DD for the
 * caller to format.
 */
export interface FieldMessage { key: string; params: Record<string, string>; dates?: string[] }

const RULES: Array<[RegExp, (m: RegExpExecArray) => FieldMessage]> = [
  [/^Choose at most (\d+) seats per booking$/, (m) => ({ key: 'seatsMax', params: { n: m[1]! } })],
  [/^Choose at least one seat$/, () => ({ key: 'seatsMin', params: {} })],
  [/^Choose a whole number of seats$/, () => ({ key: 'seatsWhole', params: {} })],
  [/^Enter the date of birth as YYYY-MM-DD$/, () => ({ key: 'dobFormat', params: {} })],
  [/^Enter the passport expiry date as YYYY-MM-DD$/, () => ({ key: 'expiryFormat', params: {} })],
  [/^At most (\d+) characters$/, (m) => ({ key: 'maxChars', params: { n: m[1]! } })],
  [/ may not contain control characters \(tabs, line breaks and the like\)$/, () => ({ key: 'controlChars', params: {} })],
  [/^Write the number in international form, starting with \+ and the country code/, () => ({ key: 'phoneInternational', params: {} })],
  [/^Not a valid phone number/, () => ({ key: 'phoneInvalid', params: {} })],
  [/^Unknown country code: use the two-letter ISO 3166-1 code/, () => ({ key: 'country', params: {} })],
  [/^A passport number is 5–20 letters and digits, as printed$/, () => ({ key: 'passportNumber', params: {} })],
  [/^Choose single, double, twin or shared$/, () => ({ key: 'room', params: {} })],
  [/^A date of birth cannot be in the future$/, () => ({ key: 'dobFuture', params: {} })],
  [/^Check the year of birth$/, () => ({ key: 'dobYear', params: {} })],
  [/^The passport expires less than (\d+) months after the trip ends \((\d{4}-\d{2}-\d{2})\): .*valid until (\d{4}-\d{2}-\d{2}) or later/,
    (m) => ({ key: 'passportExpiry', params: { months: m[1]!, end: m[2]!, until: m[3]! }, dates: ['end', 'until'] })],
]

export function tripFieldMessage(msg: string): FieldMessage | null {
  for (const [re, make] of RULES) {
    const m = re.exec(msg)
    if (m) return make(m)
  }
  return null
}
