import type { Kysely } from 'kysely'
import { doubleType } from '../dialect'

/**
 * Per-trip margins of the filters-off window (shared/safety/cues.ts): organisers may widen them
 * above the defaults of 2 σ and 5 s; the service never reads them as anything smaller.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').addColumn('filter_margin_sigmas', doubleType(db), (c) => c.notNull().defaultTo(2)).execute()
  await db.schema.alterTable('trips').addColumn('filter_margin_end_sec', doubleType(db), (c) => c.notNull().defaultTo(5)).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').dropColumn('filter_margin_end_sec').execute()
  await db.schema.alterTable('trips').dropColumn('filter_margin_sigmas').execute()
}
