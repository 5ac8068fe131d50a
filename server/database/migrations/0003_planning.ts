import { sql, type Kysely } from 'kysely'
import { doubleType, idColumn, idColumnType, nowIsoDefault } from '../dialect'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('workspaces')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('eclipse_id', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addUniqueConstraint('workspaces_eclipse_name', ['eclipse_id', 'name'])
    .execute()
  await db.schema.createTable('sites')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('workspace_id', 'integer', (c) => c.notNull().references('workspaces.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('lat', doubleType(db), (c) => c.notNull().check(sql`lat between -90 and 90`))
    .addColumn('lon', doubleType(db), (c) => c.notNull().check(sql`lon between -180 and 180`))
    .addColumn('elevation_m', doubleType(db), (c) => c.notNull().defaultTo(0))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('road_access', 'text', (c) => c.notNull().defaultTo('unknown'))
    .addColumn('capacity', 'integer')
    .addColumn('crosses_border', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('pinned', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('sites_workspace').on('sites').column('workspace_id').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('sites').execute()
  await db.schema.dropTable('workspaces').execute()
}
