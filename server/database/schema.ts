import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely'
import type { AlertsTables } from './tables/alerts'
import type { DecisionTables } from './tables/decisions'
import type { ForecastTables } from './tables/forecasts'
import type { LocaleTables } from './tables/locale'
import type { PeopleTables } from './tables/people'
import type { PersonalDataTables } from './tables/personalData'
import type { PlanningDetailsTables } from './tables/planningDetails'
import type { SeatCounterTables } from './tables/seatCounter'
import type { TripOpsTables } from './tables/tripOps'
import type { VoyageTables } from './tables/voyages'

/** Roles, from least to most privileged. Stored in users.role. */
export const ROLES = ['traveller', 'guide', 'organiser'] as const
export type Role = (typeof ROLES)[number]

export interface UsersTable {
  id: Generated<number>
  email: string
  name: string
  password_hash: string
  role: Role
  /** UTC ISO 8601. */
  created_at: ColumnType<string, string | undefined, never>
  /** When the owner of the address confirmed it (UTC ISO); null until then: such accounts cannot hold seats. */
  email_confirmed_at: ColumnType<string | null, string | null | undefined, string | null>
  /** Raised to end every session at once (sign-out, password or role change, "sign out everywhere"). */
  session_version: Auto<number>
  /** When the owner had the account's personal data erased (UTC ISO; migration 0021); null otherwise. */
  erased_at: ColumnType<string | null, string | null | undefined, string | null>
  /** The account's language, one of LOCALE_CODES in shared/i18n/locales.ts (migration 0023). */
  locale: Auto<string>
}

export interface AuditLogTable {
  id: Generated<number>
  /** UTC ISO 8601. */
  at: ColumnType<string, string | undefined, never>
  action: string
  actor_user_id: number | null
  subject_user_id: number | null
  ip: string | null
  /** JSON text. */
  detail: string | null
}

export interface SignInFailuresTable {
  id: Generated<number>
  email: string
  ip: string
  /** UTC ISO 8601. */
  at: string
}

export interface ElementSetsTable {
  id: Generated<number>
  eclipse_id: string
  /** The published element set, JSON text. */
  elements: string
  source: string
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface EclipseSettingsTable {
  eclipse_id: string
  /** ΔT override in seconds, or null for the model. */
  delta_t_sec: number | null
  updated_by: number | null
  updated_at: string
}

export interface WorkspacesTable {
  id: Generated<number>
  eclipse_id: string
  name: string
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
  climatology_id: ColumnType<number | null, number | null | undefined, number | null>
  /** P(clear) weights of the scattered and broken sky categories (0–1); null: the published defaults. */
  cloud_weight_scattered: ColumnType<number | null, number | null | undefined, number | null>
  cloud_weight_broken: ColumnType<number | null, number | null | undefined, number | null>
}

export const ROAD_ACCESS = ['paved', 'gravel', 'track', 'none', 'unknown'] as const
export interface SitesTable {
  id: Generated<number>
  workspace_id: number
  name: string
  /** Geodetic latitude, degrees north. */
  lat: number
  /** Longitude, degrees east. */
  lon: number
  /** Height above the ellipsoid's sea level, m; 0 while elevation_source is null (not set: contacts assume sea level). */
  elevation_m: ColumnType<number, number | undefined, number>
  /** Where the height came from: 'given' (typed or imported), 'terrain' (the workspace's height model), or null (never set). */
  elevation_source: ColumnType<'given' | 'terrain' | null, 'given' | 'terrain' | null | undefined, 'given' | 'terrain' | null>
  /** 1 while the site carries a name the planning page made up ("Best ground 1 (…)"): trips using it cannot be published. */
  name_auto: ColumnType<number, number | undefined, number>
  notes: ColumnType<string, string | undefined, string>
  road_access: ColumnType<(typeof ROAD_ACCESS)[number], (typeof ROAD_ACCESS)[number] | undefined, (typeof ROAD_ACCESS)[number]>
  capacity: number | null
  crosses_border: ColumnType<number, number | undefined, number>
  pinned: ColumnType<number, number | undefined, number>
  /** Manual cloud-cover override, percent, and its source note; wins over the climatology. */
  cloud_override_pct: ColumnType<number | null, number | null | undefined, number | null>
  cloud_override_note: ColumnType<string | null, string | null | undefined, string | null>
  created_at: ColumnType<string, string | undefined, never>
  updated_at: ColumnType<string, string | undefined, string>
}

export interface ClimatologyDatasetsTable {
  id: Generated<number>
  name: string
  source: string
  licence: ColumnType<string, string | undefined, string>
  years: ColumnType<string, string | undefined, string>
  time_of_day: ColumnType<string, string | undefined, string>
  demo: ColumnType<number, number | undefined, number>
  format: 'geotiff' | 'csv'
  lat0: number
  lon0: number
  dlat: number
  dlon: number
  nlat: number
  nlon: number
  has_categories: ColumnType<number, number | undefined, number>
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface TerrainModelsTable {
  id: Generated<number>
  workspace_id: number
  name: string
  lat0: number
  lon0: number
  dlat: number
  dlon: number
  nlat: number
  nlon: number
  min_m: number
  max_m: number
  heights: Buffer
  created_by: number | null
  created_at: ColumnType<string, string | undefined, never>
}

export interface ClimatologyGridsTable {
  dataset_id: number
  month: number
  cloud_pct: Buffer
  clear_pct: Buffer | null
  scattered_pct: Buffer | null
  broken_pct: Buffer | null
}

export type Auto<T> = ColumnType<T, T | undefined, T>
export type Created = ColumnType<string, string | undefined, never>

export interface TripsTable {
  id: Generated<number>
  workspace_id: number
  eclipse_id: string
  primary_site_id: number
  title: string
  description: Auto<string>
  /** Calendar dates YYYY-MM-DD. */
  start_date: string
  end_date: string
  meeting_name: string
  meeting_lat: number
  meeting_lon: number
  meeting_time_utc: string
  seats: number
  /** Money in integer minor units of `currency` (ISO 4217, lower case). */
  price_minor: number
  deposit_minor: number
  currency: string
  balance_due_date: string
  /** JSON: [{ until: 'YYYY-MM-DD', refundPct }], ascending. */
  cancellation_tiers: Auto<string>
  min_group_size: Auto<number>
  status: Auto<'draft' | 'published'>
  /** JSON cue offsets for the guide's timetable, or null for the defaults. */
  cue_offsets: ColumnType<string | null, string | null | undefined, string | null>
  /** Margins of the filters-off window: σ multiples and extra seconds before C3 (never below 2 and 5). */
  filter_margin_sigmas: ColumnType<number, number | undefined, number>
  filter_margin_end_sec: ColumnType<number, number | undefined, number>
  /** JSON array of the briefing's "what to bring" lines, or null for the default list. */
  briefing_checklist: ColumnType<string | null, string | null | undefined, string | null>
  created_by: number | null
  created_at: Created
  /** 1 while the trip takes new holds, 0 once the organiser closed sales (migration 0016). */
  sales_open: ColumnType<number, number | undefined, number>
}

export interface BookingsTable {
  id: Generated<number>
  trip_id: number
  user_id: number
  seats: number
  status: 'held' | 'confirmed' | 'cancelled' | 'expired'
  hold_expires_at: string | null
  price_minor: number
  deposit_minor: number
  paid_minor: Auto<number>
  refunded_minor: Auto<number>
  currency: string
  cancel_reason: ColumnType<string | null, string | null | undefined, string | null>
  created_at: Created
  updated_at: Auto<string>
}

export interface PaymentsTable {
  id: Generated<number>
  booking_id: number
  kind: 'deposit' | 'balance'
  amount_minor: number
  currency: string
  status: 'pending' | 'succeeded' | 'failed'
  checkout_session_id: string | null
  payment_intent_id: string | null
  /** Random idempotency key for the Stripe calls about this payment (unique across databases). */
  idem_key: string
  demo: Auto<number>
  created_at: Created
  completed_at: string | null
  /** Why a checkout ended without payment (expired, superseded, unknown to Stripe), or null. */
  note: ColumnType<string | null, string | null | undefined, string | null>
}

export interface RefundsTable {
  id: Generated<number>
  booking_id: number
  payment_id: number | null
  amount_minor: number
  reason: string
  status: 'pending' | 'succeeded' | 'failed'
  stripe_refund_id: string | null
  idem_key: string
  error: string | null
  created_by: number | null
  created_at: Created
  /** Durable job: how often Stripe was asked, when to ask next, when the organiser was told it keeps failing. */
  attempts: Auto<number>
  next_attempt_at: ColumnType<string | null, string | null | undefined, string | null>
  organiser_notified_at: ColumnType<string | null, string | null | undefined, string | null>
  /** When Stripe reported the refund succeeded. */
  completed_at: ColumnType<string | null, string | null | undefined, string | null>
  /** 1 when it returns a stray payment (money that never counted towards the booking). */
  stray: Auto<number>
}

export interface WaitlistTable {
  id: Generated<number>
  trip_id: number
  user_id: number
  seats: number
  status: 'waiting' | 'offered' | 'accepted' | 'expired' | 'cancelled'
  offer_expires_at: string | null
  booking_id: number | null
  created_at: Created
}

export interface OutboxTable {
  id: Generated<number>
  message_id: string
  dedupe_key: string | null
  kind: string
  to_email: string
  to_name: Auto<string>
  subject: string
  html: string
  text: string
  /** JSON: [{ filename, content, contentType }]. */
  attachments: Auto<string>
  status: Auto<'queued' | 'sending' | 'sent' | 'failed'>
  attempts: Auto<number>
  next_attempt_at: string
  last_error: string | null
  booking_id: number | null
  trip_id: number | null
  created_at: Created
  sending_since: string | null
  sent_at: string | null
  /**
   * The one-time token of a link in this message, sealed (server/services/sealed.ts) under
   * "outbox:<message_id>"; the bodies hold a placeholder instead. Cleared once sent or given up.
   */
  sealed_secret: ColumnType<string | null, string | null | undefined, string | null>
  /** The language the message was written in, a code from shared/i18n/locales.ts (migration 0026). */
  locale: Auto<string>
}

/** A one-time link that sets a password: a reset (one hour) or an invitation (seven days). */
export interface AccountTokensTable {
  /** SHA-256 (hex) of the token; the token itself is never stored. */
  token_hash: string
  user_id: number
  purpose: 'reset' | 'invite'
  /** UTC ISO 8601. */
  expires_at: string
  /** Spent or superseded (UTC ISO); null while the link still works. */
  used_at: ColumnType<string | null, string | null | undefined, string | null>
  created_at: Created
}

/** A housekeeping job's lease: the holder runs the job until expires_at (UTC ISO). */
export interface JobLeasesTable {
  name: string
  holder: string
  expires_at: string
}

/** Fixed-window request counts per key, shared by every app instance (PostgreSQL set-ups). */
export interface RateLimitHitsTable {
  key: string
  window_start: string
  hits: number
  expires_at: string
}

/** Two-factor sign-in state of one user (RFC 6238 TOTP); secrets sealed with context "totp:<user id>". */
export interface UserTotpTable {
  user_id: number
  /** The confirmed secret (sealed); null until set-up is confirmed. */
  secret_sealed: string | null
  /** When two-factor was turned on (UTC ISO); null while only pending. */
  enabled_at: string | null
  /** A secret offered for set-up, not yet confirmed (sealed). */
  pending_sealed: string | null
  pending_created_at: string | null
  /** The last accepted time step (floor(Unix seconds / 30)); a code is accepted once. */
  last_step: number | null
}

export interface TotpRecoveryCodesTable {
  id: Generated<number>
  user_id: number
  /** SHA-256 (hex) of the normalised code; the code itself is shown once and never stored. */
  code_hash: string
  used_at: string | null
  created_at: Created
}

/** App-wide settings, one JSON value per key. */
export interface AppSettingsTable {
  key: string
  value: string
  updated_at: Auto<string>
  updated_by: number | null
}

/**
 * Every table. Tables added by one area of work live in their own file under ./tables and are
 * merged in here.
 */
export interface Database extends PeopleTables, TripOpsTables, AlertsTables, PlanningDetailsTables, ForecastTables, DecisionTables, PersonalDataTables, SeatCounterTables, LocaleTables, VoyageTables {
  job_leases: JobLeasesTable
  rate_limit_hits: RateLimitHitsTable
  users: UsersTable
  user_totp: UserTotpTable
  totp_recovery_codes: TotpRecoveryCodesTable
  app_settings: AppSettingsTable
  audit_log: AuditLogTable
  sign_in_failures: SignInFailuresTable
  element_sets: ElementSetsTable
  eclipse_settings: EclipseSettingsTable
  workspaces: WorkspacesTable
  sites: SitesTable
  climatology_datasets: ClimatologyDatasetsTable
  climatology_grids: ClimatologyGridsTable
  terrain_models: TerrainModelsTable
  trips: TripsTable
  trip_backup_sites: { trip_id: number; site_id: number; rank: number }
  trip_guides: { trip_id: number; user_id: number }
  bookings: BookingsTable
  payments: PaymentsTable
  refunds: RefundsTable
  stripe_events: { id: string; type: string; received_at: Created }
  stripe_customers: { user_id: number; customer_id: string }
  waitlist: WaitlistTable
  outbox: OutboxTable
  account_tokens: AccountTokensTable
  email_confirmations: { token_hash: string; user_id: number; expires_at: string; used_at: ColumnType<string | null, string | null | undefined, string | null> }
  reconciliation_items: {
    id: Generated<number>; run_at: string; booking_id: number | null; payment_id: number | null
    /** 'difference' (ledger ≠ Stripe), 'unknown-session', 'error'. */
    kind: string
    ledger_net_minor: number | null; stripe_net_minor: number | null; detail: string
  }
}

export type User = Selectable<UsersTable>
export type SiteRow = Selectable<SitesTable>
export type NewUser = Insertable<UsersTable>
export type UserUpdate = Updateable<UsersTable>
