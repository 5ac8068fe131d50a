import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import type { BookingSearchInput } from '../../../shared/schemas/operations'
import { toMajorUnits } from '../../../shared/money/minorUnits'
import { toSafeCsv } from '../csv'
import { tripBookings } from '../tripAdmin'

type TripBookings = Awaited<ReturnType<typeof tripBookings>>
type BookingLine = TripBookings['data'][number]

/**
 * Whether a booking matches the organiser's filters: `q` a case-insensitive part of the name or the
 * e-mail, `status` exactly, `owing` whether some of the price is still owed on a confirmed booking
 * (the table's "balance"). Filtered here rather than in SQL so that both databases fold case the
 * same way (SQLite's lower() knows only ASCII); a trip's bookings are a few hundred rows at most.
 */
export function matchesSearch(b: Pick<BookingLine, 'name' | 'email' | 'status' | 'balanceMinor'>, f: BookingSearchInput): boolean {
  if (f.status && b.status !== f.status) return false
  if (f.owing !== undefined && (b.balanceMinor > 0) !== f.owing) return false
  if (f.q) {
    const q = f.q.toLocaleLowerCase('en')
    if (!b.name.toLocaleLowerCase('en').includes(q) && !b.email.toLocaleLowerCase('en').includes(q)) return false
  }
  return true
}

/** The organiser's bookings table of a trip, filtered; meta says how many match out of how many. */
export async function searchTripBookings(db: Kysely<Database>, tripId: number, f: BookingSearchInput) {
  const all = await tripBookings(db, tripId)
  const data = all.data.filter((b) => matchesSearch(b, f))
  return { ...all, data, meta: { total: all.data.length, matched: data.length, filters: { q: f.q ?? '', status: f.status ?? '', owing: f.owing ?? null } } }
}

const CSV_COLUMNS = ['booking_id', 'name', 'email', 'seats', 'status', 'currency', 'price', 'paid', 'refunded', 'due_now', 'balance', 'created_at']

/**
 * The bookings as CSV for accounts: amounts in major units with the currency's own decimals
 * (ISO 4217 minor units: EUR 2, JPY 0, KWD 3) and the currency code beside them; every text cell
 * made spreadsheet-safe (server/services/csv.ts).
 */
export async function searchTripBookingsCsv(db: Kysely<Database>, tripId: number, f: BookingSearchInput): Promise<string> {
  const { data } = await searchTripBookings(db, tripId, f)
  const major = (minor: number, b: BookingLine) => toMajorUnits(minor, b.currency)
  // No match still gives the header row, so a spreadsheet opens it with its columns.
  if (!data.length) return `${CSV_COLUMNS.join(',')}\r\n`
  return toSafeCsv(data.map((b) => ({
    booking_id: b.id, name: b.name, email: b.email, seats: b.seats, status: b.status, currency: b.currency.toUpperCase(),
    price: major(b.priceMinor, b), paid: major(b.paidMinor, b), refunded: major(b.refundedMinor, b),
    due_now: major(b.dueMinor, b), balance: major(b.balanceMinor, b), created_at: b.createdAt,
  }))) // traveller names like "=HYPERLINK(…)" stay text in a spreadsheet
}
