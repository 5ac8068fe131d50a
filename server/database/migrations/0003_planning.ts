import { sql, type Kysely } from 'kysely'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('workspaces')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('eclipse_id', 'text', (c) => c.notNull())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .addUniqueConstraint('workspaces_eclipse_name', ['eclipse_id', 'name'])
    .execute()
  await db.schema.createTable('sites')
    .addColumn('id', 'integer', (c) => c.primaryKey().autoIncrement())
    .addColumn('workspace_id', 'integer', (c) => c.notNull().references('workspaces.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('lat', 'real', (c) => c.notNull().check(sql`lat between -90 and 90`))
    .addColumn('lon', 'real', (c) => c.notNull().check(sql`lon between -180 and 180`))
    .addColumn('elevation_m', 'real', (c) => c.notNull().defaultTo(0))
    .addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('road_access', 'text', (c) => c.notNull().defaultTo('unknown'))
    .addColumn('capacity', 'integer')
    .addColumn('crosses_border', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('pinned', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .addColumn('updated_at', 'text', (c) => c.notNull().defaultTo(sql`(strftime('%Y-%m-%dT%H:%M:%fZ','now'))`))
    .execute()
  await db.schema.createIndex('sites_workspace').on('sites').column('workspace_id').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('sites').execute()
  await db.schema.dropTable('workspaces').execute()
}
