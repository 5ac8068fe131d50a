import type { Kysely } from 'kysely'

/** The traveller's briefing: a per-trip "what to bring" list the organiser edits (JSON array of text), null for the default list. */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').addColumn('briefing_checklist', 'text').execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').dropColumn('briefing_checklist').execute()
}
