import { sql, type Kysely } from 'kysely'
import { blobType, doubleType, idColumn, idColumnType, nowIsoDefault } from '../dialect'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('climatology_datasets')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('licence', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('years', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('time_of_day', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('demo', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('format', 'text', (c) => c.notNull())
    // Regular latitude/longitude grid of cell centres (EPSG:4326): first centre and spacing, degrees.
    .addColumn('lat0', doubleType(db), (c) => c.notNull())
    .addColumn('lon0', doubleType(db), (c) => c.notNull())
    .addColumn('dlat', doubleType(db), (c) => c.notNull())
    .addColumn('dlon', doubleType(db), (c) => c.notNull())
    .addColumn('nlat', 'integer', (c) => c.notNull())
    .addColumn('nlon', 'integer', (c) => c.notNull())
    .addColumn('has_categories', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  // One row per month: Float32 grids (row-major, latitude rows from lat0), NaN for no data.
  await db.schema.createTable('climatology_grids')
    .addColumn('dataset_id', 'integer', (c) => c.notNull().references('climatology_datasets.id').onDelete('cascade'))
    .addColumn('month', 'integer', (c) => c.notNull().check(sql`month between 1 and 12`))
    .addColumn('cloud_pct', blobType(db), (c) => c.notNull())
    .addColumn('clear_pct', blobType(db))
    .addColumn('scattered_pct', blobType(db))
    .addColumn('broken_pct', blobType(db))
    .addPrimaryKeyConstraint('climatology_grids_pk', ['dataset_id', 'month'])
    .execute()
  await db.schema.alterTable('workspaces').addColumn('climatology_id', 'integer', (c) => c.references('climatology_datasets.id').onDelete('set null')).execute()
  await db.schema.alterTable('sites').addColumn('cloud_override_pct', doubleType(db)).execute()
  await db.schema.alterTable('sites').addColumn('cloud_override_note', 'text').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('sites').dropColumn('cloud_override_note').execute()
  await db.schema.alterTable('sites').dropColumn('cloud_override_pct').execute()
  await db.schema.alterTable('workspaces').dropColumn('climatology_id').execute()
  await db.schema.dropTable('climatology_grids').execute()
  await db.schema.dropTable('climatology_datasets').execute()
}
