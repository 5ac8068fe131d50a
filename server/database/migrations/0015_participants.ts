import type { Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

/**
 * The expedition manifest: one participant per booked seat (seat 1 is the booking holder), and a log
 * of every read of passport numbers or medical notes.
 *
 * Columns ending in `_sealed` hold AES-256-GCM values (server/services/sealed.ts) bound to the context
 * `participant:<booking id>:<seat>:<field>` (server/services/people/participantSeal.ts); nothing
 * personal beyond the passport name, nationality, passport expiry, the emergency contact's name and
 * relation and the rooming wish is stored in the clear.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('participants')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('booking_id', 'integer', (c) => c.notNull().references('bookings.id').onDelete('cascade'))
    .addColumn('seat', 'integer', (c) => c.notNull())
    .addColumn('full_name', 'text')
    .addColumn('nationality', 'text')
    .addColumn('date_of_birth_sealed', 'text')
    .addColumn('passport_number_sealed', 'text')
    .addColumn('passport_expiry', 'text')
    .addColumn('mobile_phone_sealed', 'text')
    .addColumn('dietary_sealed', 'text')
    .addColumn('medical_sealed', 'text')
    .addColumn('mobility_sealed', 'text')
    .addColumn('emergency_name', 'text')
    .addColumn('emergency_phone_sealed', 'text')
    .addColumn('emergency_relation', 'text')
    .addColumn('room_type', 'text')
    .addColumn('room_with', 'text')
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    // Set when the details were purged or erased: the row stays (the seat existed), the data goes.
    .addColumn('erased_at', 'text')
    .execute()
  await db.schema.createIndex('participants_booking_seat').on('participants').columns(['booking_id', 'seat']).unique().execute()
  await db.schema.createTable('participant_access_log')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    // Comma-separated fields read, e.g. "passportNumber,medical".
    .addColumn('fields', 'text', (c) => c.notNull())
    // What was read through: "manifest", "manifest.csv", "manifest.xlsx", "emergency-sheet", ….
    .addColumn('via', 'text', (c) => c.notNull())
    .addColumn('at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('participant_access_log_trip').on('participant_access_log').columns(['trip_id', 'at']).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('participant_access_log').execute()
  await db.schema.dropTable('participants').execute()
}
