import type { Kysely } from 'kysely'

/**
 * A per-user session version: every session cookie carries the version it was issued under, and
 * requireUser refuses a cookie whose version is not the user's current one. Raising it (sign-out,
 * password change, role change, "sign out everywhere") ends every other session at once.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').addColumn('session_version', 'integer', (c) => c.notNull().defaultTo(1)).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('session_version').execute()
}
