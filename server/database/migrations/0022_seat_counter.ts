import { sql, type Kysely } from 'kysely'
import { doubleType } from '../dialect'

/**
 * Seat counters, one row per trip, filled from the bookings and offers already there (held and
 * confirmed bookings, live waitlist offers): the exact count every later hand-out and release keeps.
 * Also the workspace's cloud weights for P(clear) (null: the published defaults).
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  // One active hold per traveller and trip, now kept by the database (holds no longer take the trip's
  // lock). Earlier duplicates, if any, keep only the newest hold.
  await sql`update bookings set status = 'expired' where status = 'held' and exists (
    select 1 from bookings b2 where b2.trip_id = bookings.trip_id and b2.user_id = bookings.user_id and b2.status = 'held' and b2.id > bookings.id)`.execute(db)
  await sql`create unique index bookings_one_hold on bookings (trip_id, user_id) where status = 'held'`.execute(db)
  await db.schema.createTable('seat_counters')
    .addColumn('trip_id', 'integer', (c) => c.primaryKey().references('trips.id').onDelete('cascade'))
    .addColumn('claimed', 'integer', (c) => c.notNull().defaultTo(0))
    .execute()
  await sql`insert into seat_counters (trip_id, claimed)
    select t.id,
      coalesce((select sum(b.seats) from bookings b where b.trip_id = t.id and b.status in ('held', 'confirmed')), 0)
      + coalesce((select sum(w.seats) from waitlist w where w.trip_id = t.id and w.status = 'offered'), 0)
    from trips t`.execute(db)
  await db.schema.alterTable('workspaces').addColumn('cloud_weight_scattered', doubleType(db)).execute()
  await db.schema.alterTable('workspaces').addColumn('cloud_weight_broken', doubleType(db)).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`drop index bookings_one_hold`.execute(db)
  await db.schema.alterTable('workspaces').dropColumn('cloud_weight_broken').execute()
  await db.schema.alterTable('workspaces').dropColumn('cloud_weight_scattered').execute()
  await db.schema.dropTable('seat_counters').execute()
}
