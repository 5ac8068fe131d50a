import type { Kysely } from 'kysely'
import { doubleType, idColumn, idColumnType } from '../dialect'

/**
 * The forecast outlook: every fetch of a trip's cloud forecast (kept, so trends can be shown), each
 * site's values in it, and the sites and drive times an organiser adds to the outlook.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('forecast_runs')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('fetched_at', 'text', (c) => c.notNull())
    .addColumn('cause', 'text', (c) => c.notNull())
    .addColumn('requested_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .execute()
  await db.schema.createIndex('forecast_runs_trip').on('forecast_runs').columns(['trip_id', 'fetched_at']).execute()
  await db.schema.createTable('forecast_values')
    .addColumn('run_id', 'integer', (c) => c.notNull().references('forecast_runs.id').onDelete('cascade'))
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('max_utc', 'text', (c) => c.notNull())
    .addColumn('cloud_pct', doubleType(db), (c) => c.notNull())
    .addColumn('low_pct', doubleType(db), (c) => c.notNull())
    .addColumn('mid_pct', doubleType(db), (c) => c.notNull())
    .addColumn('high_pct', doubleType(db), (c) => c.notNull())
    .addColumn('hourly', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('forecast_values_pk', ['run_id', 'site_id'])
    .execute()
  await db.schema.createIndex('forecast_values_site').on('forecast_values').column('site_id').execute()
  await db.schema.createTable('outlook_sites')
    .addColumn('trip_id', 'integer', (c) => c.notNull().references('trips.id').onDelete('cascade'))
    .addColumn('site_id', 'integer', (c) => c.notNull().references('sites.id').onDelete('cascade'))
    .addColumn('extra', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('drive_minutes', 'integer')
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('outlook_sites_pk', ['trip_id', 'site_id'])
    .execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('outlook_sites').execute()
  await db.schema.dropTable('forecast_values').execute()
  await db.schema.dropTable('forecast_runs').execute()
}
