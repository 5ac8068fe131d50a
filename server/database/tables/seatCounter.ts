import type { ColumnType } from 'kysely'

/**
 * One row per trip: the seats handed out, kept exact by every hand-out and release. It equals the
 * seats of the trip's bookings that are held or confirmed, plus the seats of its live waitlist
 * offers (status "offered"), lapsed or not, until housekeeping or the next hold lets them go.
 * A seat is handed out only by one conditional UPDATE of this row (server/services/seatCounter.ts),
 * so no transaction waits on the trip's row lock to count seats.
 */
export interface SeatCountersTable {
  trip_id: number
  claimed: ColumnType<number, number | undefined, number>
}

export interface SeatCounterTables {
  seat_counters: SeatCountersTable
}
