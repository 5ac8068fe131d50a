import type { Kysely } from 'kysely'
import type { Database } from '../../database/schema'
import { audit } from '../audit'
import { businessDate, nowIso } from '../clock'
import { blankParticipant, personalDataDays } from './blank'
import { flushSqliteLog } from './erase'

/** The last day of a trip whose participants' details are due for purging today: `days` whole days before today. */
export function purgeBefore(today: string, days: number): string {
  const d = new Date(`${today}T00:00:00Z`)
  d.setUTCDate(d.getUTCDate() - days)
  return d.toISOString().slice(0, 10)
}

/**
 * Purges the participant details of every trip that ended more than `days` days ago
 * (NUXT_PERSONAL_DATA_DAYS, default 90): a trip whose last day is D keeps them through D + days and
 * loses them on D + days + 1 (business date, server/services/clock.ts). Rows stay, blanked, with
 * `erased_at` set; one trip per transaction, each audited with its count only. Returns the count.
 */
export async function purgeEndedTrips(db: Kysely<Database>, days = personalDataDays()): Promise<number> {
  const before = purgeBefore(businessDate(), days)
  const trips = await db.selectFrom('trips').innerJoin('bookings', 'bookings.trip_id', 'trips.id').innerJoin('participants', 'participants.booking_id', 'bookings.id')
    .select('trips.id').distinct().where('trips.end_date', '<', before).where('participants.erased_at', 'is', null).execute()
  let total = 0
  for (const t of trips) {
    total += await db.transaction().execute(async (trx) => {
      const r = await trx.updateTable('participants').set(blankParticipant(nowIso()))
        .where('erased_at', 'is', null)
        .where('booking_id', 'in', (eb) => eb.selectFrom('bookings').select('bookings.id').where('bookings.trip_id', '=', t.id))
        .executeTakeFirst()
      const n = Number(r.numUpdatedRows)
      if (n) await audit(trx, { action: 'participants_purged', detail: { tripId: t.id, participants: n, days } })
      return n
    })
  }
  if (total) await flushSqliteLog(db)
  return total
}
