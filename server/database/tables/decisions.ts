import type { ColumnType, Generated } from 'kysely'

type Auto<T> = ColumnType<T, T | undefined, T>
type Created = ColumnType<string, string | undefined, never>
type Nullable<T> = ColumnType<T | null, T | null | undefined, T | null>

/** Where the group goes on the day (migration 0020); the newest row of a trip is in force. */
export interface TripDecisionsTable {
  id: Generated<number>
  trip_id: number
  /** One of the trip's sites (primary or a fallback). */
  site_id: number
  /** Departure from the meeting point, UTC ISO 8601. */
  depart_at: string
  /** Free text; null means the trip's own meeting point. */
  meeting_point: string | null
  message: string | null
  decided_by: number | null
  /** UTC ISO 8601 (the app's clock). */
  decided_at: string
}

/** One person told about one decision: a participant's seat, or a guide of the trip. */
export interface DecisionRecipientsTable {
  id: Generated<number>
  decision_id: number
  kind: 'participant' | 'guide'
  /** Participants: their booking and seat (seat 1 is the booking holder). */
  booking_id: number | null
  seat: number | null
  /** The account mail and pushes go to: the booking holder, or the guide. */
  user_id: number | null
  name: string
  /** SHA-256 (hex) of the acknowledgement token. */
  token_hash: string
  /** The token sealed under "decision-ack:<id>" while a re-send may need it; cleared on acknowledgement or replacement. */
  token_sealed: Nullable<string>
  acknowledged_at: Nullable<string>
  created_at: Created
}

export interface PushSubscriptionsTable {
  id: Generated<number>
  user_id: number
  endpoint: string
  /** The subscription's keys (base64url), as the browser gave them. */
  p256dh: string
  auth: string
  created_at: Created
  gone_at: Nullable<string>
}

/** The SMS and push queue of decision notices (e-mail goes through the outbox). */
export interface DecisionMessagesTable {
  id: Generated<number>
  message_id: string
  recipient_id: number
  channel: 'sms' | 'push'
  to_sealed: string | null
  push_subscription_id: number | null
  /** The text, with the outbox's placeholder where the acknowledgement token goes. */
  body: string
  sealed_secret: Nullable<string>
  status: Auto<'queued' | 'sending' | 'sent' | 'failed'>
  attempts: Auto<number>
  next_attempt_at: string
  last_error: Nullable<string>
  sending_since: Nullable<string>
  sent_at: Nullable<string>
  /** The provider's id for the message (an SMS sid). */
  provider_ref: Nullable<string>
  created_at: Created
}

export interface DecisionTables {
  trip_decisions: TripDecisionsTable
  decision_recipients: DecisionRecipientsTable
  push_subscriptions: PushSubscriptionsTable
  decision_messages: DecisionMessagesTable
}
