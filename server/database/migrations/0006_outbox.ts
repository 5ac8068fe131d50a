import { sql, type Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('outbox')
    .addColumn('id', idColumnType(db), idColumn(db))
    // RFC 5322 Message-ID, fixed at enqueue time, so a resend after a crash is recognisably the same message.
    .addColumn('message_id', 'text', (c) => c.notNull().unique())
    // Deduplicates scheduled mail (e.g. one balance reminder per booking and threshold).
    .addColumn('dedupe_key', 'text', (c) => c.unique())
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('to_email', 'text', (c) => c.notNull())
    .addColumn('to_name', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('html', 'text', (c) => c.notNull())
    .addColumn('text', 'text', (c) => c.notNull())
    .addColumn('attachments', 'text', (c) => c.notNull().defaultTo('[]'))
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('queued').check(sql`status in ('queued','sending','sent','failed')`))
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('next_attempt_at', 'text', (c) => c.notNull())
    .addColumn('last_error', 'text')
    .addColumn('booking_id', 'integer', (c) => c.references('bookings.id').onDelete('set null'))
    .addColumn('trip_id', 'integer', (c) => c.references('trips.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addColumn('sending_since', 'text')
    .addColumn('sent_at', 'text')
    .execute()
  await db.schema.createIndex('outbox_due').on('outbox').columns(['status', 'next_attempt_at']).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('outbox').execute()
}
