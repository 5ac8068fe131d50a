import type { Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

/** Voyages that intercept the central path at sea: the request and the plan computed from it (JSON text). */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('voyages')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('workspace_id', 'integer', (c) => c.notNull().references('workspaces.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('request', 'text', (c) => c.notNull())
    .addColumn('plan', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('voyages_workspace').on('voyages').column('workspace_id').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('voyages').execute()
}
