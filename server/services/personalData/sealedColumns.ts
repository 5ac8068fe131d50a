import { PARTICIPANT_SEALED, participantContext, type SealedParticipantField } from '../people/participantSeal'
import { secretContext } from '../outbox'
import { activeContext, pendingContext } from '../totp'
import { ackContext, messageSecretContext, smsContext, VAPID_SETTING, vapidContext } from '../decisionContexts'

/**
 * Every database column that holds values made by seal() (server/services/sealed.ts), with how to
 * rebuild the context each value was sealed under. Key rotation (`npm run keys:rotate`) walks this
 * list, so a sealed column missing here would keep its old key for ever: tests/unit/sealed-registry.spec.ts
 * fails when a migrated column named `*sealed*` is not listed, or a file under server/ calls seal()
 * without being named in `SEALED_WRITERS`.
 */
export interface SealedColumn {
  table: string
  column: string
  /** The single integer key of the table, to read in pages and to write one row back. */
  key: string
  /** The other columns the context is built from. */
  reads: readonly string[]
  /** The context the value was sealed under, from the row (key and `reads` columns). */
  context: (row: Record<string, unknown>) => string
}

const participantColumns: SealedColumn[] = (Object.entries(PARTICIPANT_SEALED) as Array<[SealedParticipantField, string]>).map(([field, column]) => ({
  table: 'participants',
  column,
  key: 'id',
  reads: ['booking_id', 'seat'],
  context: (r) => participantContext(Number(r.booking_id), Number(r.seat), field),
}))

export const SEALED_COLUMNS: readonly SealedColumn[] = [
  ...participantColumns,
  { table: 'user_totp', column: 'secret_sealed', key: 'user_id', reads: [], context: (r) => activeContext(Number(r.user_id)) },
  { table: 'user_totp', column: 'pending_sealed', key: 'user_id', reads: [], context: (r) => pendingContext(Number(r.user_id)) },
  { table: 'outbox', column: 'sealed_secret', key: 'id', reads: ['message_id'], context: (r) => secretContext(String(r.message_id)) },
  { table: 'decision_recipients', column: 'token_sealed', key: 'id', reads: [], context: (r) => ackContext(Number(r.id)) },
  { table: 'decision_messages', column: 'to_sealed', key: 'id', reads: ['message_id'], context: (r) => smsContext(String(r.message_id)) },
  { table: 'decision_messages', column: 'sealed_secret', key: 'id', reads: ['message_id'], context: (r) => messageSecretContext(String(r.message_id)) },
]

/** Sealed values kept inside an app setting's JSON: the setting's key, the JSON field and its context. */
export interface SealedSetting { key: string; field: string; context: string }
export const SEALED_SETTINGS: readonly SealedSetting[] = [
  { key: VAPID_SETTING, field: 'privateKeySealed', context: vapidContext },
]

/**
 * The files under server/ that call seal() (paths from the repository root), each with the columns it
 * writes. A new caller must be added here, and its column to SEALED_COLUMNS.
 */
export const SEALED_WRITERS: Readonly<Record<string, readonly string[]>> = {
  'server/services/people/participantSeal.ts': participantColumns.map((c) => `${c.table}.${c.column}`),
  'server/services/totp.ts': ['user_totp.secret_sealed', 'user_totp.pending_sealed'],
  'server/services/outbox.ts': ['outbox.sealed_secret'],
  'server/database/migrations/0013_account_tokens.ts': ['outbox.sealed_secret'],
  'server/services/decisions.ts': ['decision_recipients.token_sealed', 'decision_messages.to_sealed', 'decision_messages.sealed_secret'],
  'server/services/decisionSend.ts': [`app_settings:${VAPID_SETTING}`],
}
