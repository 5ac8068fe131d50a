import type { Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

/**
 * Organisers' alerts (a booking, a payment, a cancellation, a waitlist entry), each organiser's choice
 * of immediate mail or a daily digest, the digests sent (one per organiser per business day: the
 * primary key is what keeps two instances from sending two), and the trip's messages to its group.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('organiser_alerts')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('booking_id', 'integer', (c) => c.references('bookings.id').onDelete('set null'))
    .addColumn('kind', 'text', (c) => c.notNull())
    .addColumn('summary', 'text', (c) => c.notNull())
    // The business date (YYYY-MM-DD) the event happened on: the digest of a later day picks it up.
    .addColumn('business_date', 'text', (c) => c.notNull())
    .addColumn('delivery', 'text', (c) => c.notNull())
    .addColumn('digest_date', 'text')
    .addColumn('read_at', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('organiser_alerts_user').on('organiser_alerts').columns(['user_id', 'id']).execute()
  await db.schema.createTable('alert_preferences')
    .addColumn('user_id', 'integer', (c) => c.primaryKey().references('users.id').onDelete('cascade'))
    .addColumn('mode', 'text', (c) => c.notNull())
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createTable('alert_digests')
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('business_date', 'text', (c) => c.notNull())
    .addColumn('alert_count', 'integer', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addPrimaryKeyConstraint('alert_digests_pk', ['user_id', 'business_date'])
    .execute()
  await db.schema.createTable('trip_messages')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('author_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('body', 'text', (c) => c.notNull())
    .addColumn('audience', 'text', (c) => c.notNull())
    .addColumn('recipients', 'integer', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('trip_messages_trip').on('trip_messages').columns(['trip_id', 'id']).execute()
  // Who a message went to (the bookings of its audience when it was sent): what each traveller sees on their booking.
  await db.schema.createTable('trip_message_recipients')
    .addColumn('message_id', 'integer', (c) => c.notNull().references('trip_messages.id').onDelete('cascade'))
    .addColumn('booking_id', 'integer', (c) => c.notNull().references('bookings.id').onDelete('cascade'))
    .addPrimaryKeyConstraint('trip_message_recipients_pk', ['message_id', 'booking_id'])
    .execute()
  await db.schema.createIndex('trip_message_recipients_booking').on('trip_message_recipients').columns(['booking_id']).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('trip_message_recipients').execute()
  await db.schema.dropTable('trip_messages').execute()
  await db.schema.dropTable('alert_digests').execute()
  await db.schema.dropTable('alert_preferences').execute()
  await db.schema.dropTable('organiser_alerts').execute()
}
