import { sql, type Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

/**
 * The day's decision (where the group goes, when it leaves, where it meets), who was told and how,
 * and who has acknowledged it; plus the Web Push subscriptions of devices that opted in.
 *
 * - trip_decisions: every decision a trip has had, newest last (the newest is in force).
 * - decision_recipients: one row per person per decision (a participant's seat, or a guide), with
 *   the SHA-256 of their acknowledgement token and, until they acknowledge or the decision is
 *   replaced, the token sealed (AES-256-GCM, context "decision-ack:<id>") so a re-send carries the
 *   same link.
 * - decision_messages: the SMS and push queue (e-mail goes through the outbox): at least once, retried
 *   with backoff, the link's token sealed beside a placeholder as in the outbox.
 * - push_subscriptions: one per device endpoint, per user.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('trip_decisions')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id'))
    .addColumn('depart_at', 'text', (c) => c.notNull())
    .addColumn('meeting_point', 'text')
    .addColumn('message', 'text')
    .addColumn('decided_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('decided_at', 'text', (c) => c.notNull())
    .execute()
  await db.schema.createIndex('trip_decisions_trip').on('trip_decisions').columns(['trip_id', 'id']).execute()

  await db.schema.createTable('decision_recipients')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('decision_id', 'integer', (c) => c.notNull().references('trip_decisions.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('participant','guide')`))
    .addColumn('booking_id', 'integer', (c) => c.references('bookings.id').onDelete('cascade'))
    .addColumn('seat', 'integer')
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('token_hash', 'text', (c) => c.notNull().unique())
    .addColumn('token_sealed', 'text')
    .addColumn('acknowledged_at', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('decision_recipients_decision').on('decision_recipients').column('decision_id').execute()

  await db.schema.createTable('push_subscriptions')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('endpoint', 'text', (c) => c.notNull().unique())
    .addColumn('p256dh', 'text', (c) => c.notNull())
    .addColumn('auth', 'text', (c) => c.notNull())
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    // Set when the push service said the subscription is gone (404/410): no more pushes go to it.
    .addColumn('gone_at', 'text')
    .execute()
  await db.schema.createIndex('push_subscriptions_user').on('push_subscriptions').column('user_id').execute()

  await db.schema.createTable('decision_messages')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('message_id', 'text', (c) => c.notNull().unique())
    .addColumn('recipient_id', 'integer', (c) => c.notNull().references('decision_recipients.id').onDelete('cascade'))
    .addColumn('channel', 'text', (c) => c.notNull().check(sql`channel in ('sms','push')`))
    // SMS: the number, sealed under "decision-sms:<message_id>"; push: null (the subscription row says where).
    .addColumn('to_sealed', 'text')
    .addColumn('push_subscription_id', 'integer', (c) => c.references('push_subscriptions.id').onDelete('cascade'))
    .addColumn('body', 'text', (c) => c.notNull())
    .addColumn('sealed_secret', 'text')
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('queued').check(sql`status in ('queued','sending','sent','failed')`))
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('next_attempt_at', 'text', (c) => c.notNull())
    .addColumn('last_error', 'text')
    .addColumn('sending_since', 'text')
    .addColumn('sent_at', 'text')
    .addColumn('provider_ref', 'text')
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('decision_messages_due').on('decision_messages').columns(['status', 'next_attempt_at']).execute()
  await db.schema.createIndex('decision_messages_recipient').on('decision_messages').column('recipient_id').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('decision_messages').execute()
  await db.schema.dropTable('push_subscriptions').execute()
  await db.schema.dropTable('decision_recipients').execute()
  await db.schema.dropTable('trip_decisions').execute()
}
