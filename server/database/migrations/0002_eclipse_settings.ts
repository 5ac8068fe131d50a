import type { Kysely } from 'kysely'
import { doubleType, idColumn, idColumnType, nowIsoDefault } from '../dialect'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('element_sets')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('eclipse_id', 'text', (c) => c.notNull())
    .addColumn('elements', 'text', (c) => c.notNull())
    .addColumn('source', 'text', (c) => c.notNull())
    .addColumn('created_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createIndex('element_sets_eclipse').on('element_sets').columns(['eclipse_id', 'id']).execute()
  await db.schema.createTable('eclipse_settings')
    .addColumn('eclipse_id', 'text', (c) => c.primaryKey())
    .addColumn('delta_t_sec', doubleType(db))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('updated_at', 'text', (c) => c.notNull())
    .execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('eclipse_settings').execute()
  await db.schema.dropTable('element_sets').execute()
}
