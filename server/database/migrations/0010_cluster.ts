import type { Kysely } from 'kysely'

/**
 * What several app instances on one database share:
 * - job leases: a housekeeping job runs in the one instance holding its lease for the tick;
 * - rate-limit counters: fixed windows per key, counted in the database so every instance sees them
 *   (used on PostgreSQL; the embedded SQLite set-up is one process and counts in memory).
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.createTable('job_leases')
    .addColumn('name', 'text', (c) => c.primaryKey())
    .addColumn('holder', 'text', (c) => c.notNull())
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .execute()
  await db.schema.createTable('rate_limit_hits')
    .addColumn('key', 'text', (c) => c.notNull())
    .addColumn('window_start', 'text', (c) => c.notNull())
    .addColumn('hits', 'integer', (c) => c.notNull())
    .addColumn('expires_at', 'text', (c) => c.notNull())
    .addPrimaryKeyConstraint('rate_limit_hits_pk', ['key', 'window_start'])
    .execute()
  await db.schema.createIndex('rate_limit_hits_expiry').on('rate_limit_hits').column('expires_at').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.dropTable('rate_limit_hits').execute()
  await db.schema.dropTable('job_leases').execute()
}
