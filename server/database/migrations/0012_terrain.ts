import type { Kysely } from 'kysely'
import { blobType, doubleType, idColumn, idColumnType, nowIsoDefault } from '../dialect'

/**
 * Terrain (height) models uploaded to a planning workspace: a regular latitude/longitude grid of
 * cell centres (EPSG:4326), heights in metres as Float32 (row-major, rows south to north), NaN for no data.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('terrain_models')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('workspace_id', 'integer', (c) => c.notNull().references('workspaces.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('lat0', doubleType(db), (c) => c.notNull())
    .addColumn('lon0', doubleType(db), (c) => c.notNull())
    .addColumn('dlat', doubleType(db), (c) => c.notNull())
    .addColumn('dlon', doubleType(db), (c) => c.notNull())
    .addColumn('nlat', 'integer', (c) => c.notNull())
    .addColumn('nlon', 'integer', (c) => c.notNull())
    .addColumn('min_m', doubleType(db), (c) => c.notNull())
    .addColumn('max_m', doubleType(db), (c) => c.notNull())
    .addColumn('heights', blobType(db), (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('terrain_models_workspace').on('terrain_models').column('workspace_id').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('terrain_models').execute()
}
