import { sql, type Kysely } from 'kysely'
import { idColumn, idColumnType, nowIsoDefault } from '../dialect'

export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('users')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('email', 'text', (c) => c.notNull().unique())
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('password_hash', 'text', (c) => c.notNull())
    .addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('traveller','guide','organiser')`))
    .addColumn('created_at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .execute()
  await db.schema.createTable('audit_log')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('at', 'text', (c) => c.notNull().defaultTo(nowIsoDefault(db)))
    .addColumn('action', 'text', (c) => c.notNull())
    .addColumn('actor_user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('subject_user_id', 'integer', (c) => c.references('users.id').onDelete('set null'))
    .addColumn('ip', 'text')
    .addColumn('detail', 'text')
    .execute()
  await db.schema.createTable('sign_in_failures')
    .addColumn('id', idColumnType(db), idColumn(db))
    .addColumn('email', 'text', (c) => c.notNull())
    .addColumn('ip', 'text', (c) => c.notNull())
    .addColumn('at', 'text', (c) => c.notNull())
    .execute()
  await db.schema.createIndex('sign_in_failures_email').on('sign_in_failures').columns(['email', 'at']).execute()
  await db.schema.createIndex('sign_in_failures_ip').on('sign_in_failures').columns(['ip', 'at']).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('sign_in_failures').execute()
  await db.schema.dropTable('audit_log').execute()
  await db.schema.dropTable('users').execute()
}
