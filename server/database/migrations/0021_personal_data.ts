import type { Kysely } from 'kysely'

/**
 * Personal data: an account erased at its owner's request keeps its row (bookings and the money
 * ledger point at it, and accounting law keeps those) but loses everything personal; `erased_at`
 * says when (UTC ISO), so lists can say "erased account" rather than show a placeholder as a person.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').addColumn('erased_at', 'text').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('erased_at').execute()
}
