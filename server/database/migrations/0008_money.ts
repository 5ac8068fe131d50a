import { sql, type Kysely } from 'kysely'
import { idColumn, idColumnType } from '../dialect'

/**
 * Money that always adds up, and confirmed e-mail addresses:
 * - refunds are a durable job: attempts, next attempt, and when the organiser was told it keeps failing;
 * - payments carry a note (why a checkout was expired, or that Stripe does not know it);
 * - reconciliation findings are kept for the organiser's page;
 * - one waitlist entry per traveller per trip;
 * - e-mail confirmation tokens (stored hashed); accounts that existed before count as confirmed.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('refunds').addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0)).execute()
  await db.schema.alterTable('refunds').addColumn('next_attempt_at', 'text').execute()
  await db.schema.alterTable('refunds').addColumn('organiser_notified_at', 'text').execute()
  await db.schema.alterTable('refunds').addColumn('completed_at', 'text').execute()
  // Stray refunds give back money that never counted towards the booking (bookings.paid_minor).
  await db.schema.alterTable('refunds').addColumn('stray', 'integer', (c) => c.notNull().defaultTo(0)).execute()
  await db.schema.alterTable('payments').addColumn('note', 'text').execute()
  await db.schema.alterTable('users').addColumn('email_confirmed_at', 'text').execute()
  await sql`update users set email_confirmed_at = created_at`.execute(db)
  await db.schema.createTable('email_confirmations')
    .addColumn('token_hash', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .addColumn('used_at', 'text')
    .execute()
  await db.schema.createTable('reconciliation_items')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('run_at', 'text', (c) => c.notNull())
    .addColumn('booking_id', 'integer', (c) => c.references('bookings.id'))
    .addColumn('payment_id', 'integer', (c) => c.references('payments.id'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('ledger_net_minor', 'integer')
    .addColumn('stripe_net_minor', 'integer')
    .addColumn('detail', 'text', (c) => c.notNull())
    .execute()
  await db.schema.createIndex('refunds_due').on('refunds').columns(['status', 'next_attempt_at']).execute()
  await db.schema.createIndex('waitlist_one_per_traveller').on('waitlist').columns(['trip_id', 'user_id']).unique()
    .where(sql.ref('status'), 'in', sql`('waiting', 'offered')`).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropIndex('waitlist_one_per_traveller').execute()
  await db.schema.dropIndex('refunds_due').execute()
  await db.schema.dropTable('reconciliation_items').execute()
  await db.schema.dropTable('email_confirmations').execute()
  for (const [t, c] of [['users', 'email_confirmed_at'], ['payments', 'note'], ['refunds', 'stray'], ['refunds', 'completed_at'], ['refunds', 'organiser_notified_at'], ['refunds', 'next_attempt_at'], ['refunds', 'attempts']] as const) {
    await db.schema.alterTable(t).dropColumn(c).execute()
  }
}
