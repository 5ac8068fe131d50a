import type { ColumnType, Generated } from 'kysely'

type Stamp = ColumnType<string, string | undefined, never>
type Nullable = ColumnType<string | null, string | null | undefined, string | null>

export type AlertKind = 'booking' | 'payment' | 'cancellation' | 'waitlist'
export type AlertMode = 'immediate' | 'digest'

/** One event of a trip, for one organiser (see migration 0017). */
export interface OrganiserAlertsTable {
  id: Generated<number>
  user_id: number
  trip_id: number
  booking_id: number | null
  kind: AlertKind
  /** One line of plain text, e.g. "Ana Ruiz holds 2 seats". */
  summary: string
  /** YYYY-MM-DD, the business date of the event. */
  business_date: string
  /** 'immediate': mailed with the event; 'digest': waits for the next day's digest. */
  delivery: AlertMode
  /** The business date of the digest that carried it; null while it waits (or when mailed at once). */
  digest_date: Nullable
  /** UTC ISO when the organiser marked it read; null while unread. */
  read_at: Nullable
  created_at: Stamp
}

export interface AlertPreferencesTable {
  user_id: number
  mode: AlertMode
  updated_at: ColumnType<string, string | undefined, string>
}

/** One row per organiser per business day on which a digest was sent. */
export interface AlertDigestsTable {
  user_id: number
  business_date: string
  alert_count: number
  created_at: Stamp
}

/** A message an organiser sent to a trip's group; the mails themselves are in the outbox. */
export interface TripMessagesTable {
  id: Generated<number>
  trip_id: number
  author_id: number | null
  subject: string
  body: string
  audience: 'confirmed' | 'all'
  recipients: number
  created_at: Stamp
}

export interface TripMessageRecipientsTable {
  message_id: number
  booking_id: number
}

export interface AlertsTables {
  trip_message_recipients: TripMessageRecipientsTable
  organiser_alerts: OrganiserAlertsTable
  alert_preferences: AlertPreferencesTable
  alert_digests: AlertDigestsTable
  trip_messages: TripMessagesTable
}
