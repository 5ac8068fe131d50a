import type { Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

/**
 * Two-factor sign-in (TOTP, RFC 6238): one row per user who started or finished setting it up, their
 * single-use recovery codes (stored only as SHA-256 of a high-entropy code), and app-wide settings
 * such as "staff must use two-factor". Secrets are sealed (AES-256-GCM, server/services/sealed.ts).
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('user_totp')
    .addColumn('user_id', 'integer', (c) => c.primaryKey().references('users.id').onDelete('cascade'))
    // The confirmed secret, sealed with context "totp:<user id>"; null until set-up is confirmed.
    .addColumn('secret_sealed', 'text')
    .addColumn('enabled_at', 'text')
    // A secret offered for set-up but not yet confirmed with a code, sealed likewise.
    .addColumn('pending_sealed', 'text')
    .addColumn('pending_created_at', 'text')
    // The last time step (Unix seconds / 30) whose code was accepted: a code is good once.
    .addColumn('last_step', 'integer')
    .execute()
  await db.schema.createTable('totp_recovery_codes')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('code_hash', 'text', (c) => c.notNull())
    .addColumn('used_at', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('totp_recovery_codes_user_hash').on('totp_recovery_codes').columns(['user_id', 'code_hash']).unique().execute()
  await db.schema.createTable('app_settings')
    .addColumn('key', 'text', (c) => c.primaryKey())
    // JSON text.
    .addColumn('value', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('app_settings').execute()
  await db.schema.dropTable('totp_recovery_codes').execute()
  await db.schema.dropTable('user_totp').execute()
}
