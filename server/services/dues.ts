import type { Selectable } from 'kysely'
import type { BookingsTable } from '../database/schema'

export type BookingRow = Selectable<BookingsTable>

/** What the traveller owes now: the deposit while held, the balance once confirmed, nothing once ended. */
export function dueOf(b: BookingRow): number {
  if (b.status === 'cancelled' || b.status === 'expired') return 0
  const target = b.status === 'held' ? b.deposit_minor : b.price_minor
  return Math.max(0, target - b.paid_minor)
}
