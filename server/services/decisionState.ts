import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'

/** The decision in force for a trip, as the timetable, briefing, calendar and countdown show it. */
export interface DecisionInForce {
  id: number
  siteId: number
  /** Departure from the meeting point, UTC ISO 8601. */
  departAt: string
  /** Where to meet; the trip's own meeting point when none was given. */
  meetingPoint: string
  message: string | null
  decidedAt: string
}

/**
 * The newest decision of a trip, or null. Kept apart from the decision service (which needs the
 * timetable for C1) so the timetable can read it without an import cycle.
 */
export async function decisionInForce(db: Kysely<Database> | Transaction<Database>, tripId: number): Promise<DecisionInForce | null> {
  const d = await db.selectFrom('trip_decisions').innerJoin('trips', 'trips.id', 'trip_decisions.trip_id')
    .select(['trip_decisions.id', 'trip_decisions.site_id', 'trip_decisions.depart_at', 'trip_decisions.meeting_point', 'trip_decisions.message', 'trip_decisions.decided_at', 'trips.meeting_name'])
    .where('trip_decisions.trip_id', '=', tripId).orderBy('trip_decisions.id', 'desc').limit(1).executeTakeFirst()
  if (!d) return null
  return { id: d.id, siteId: d.site_id, departAt: d.depart_at, meetingPoint: d.meeting_point ?? d.meeting_name, message: d.message, decidedAt: d.decided_at }
}
