import type { Kysely } from 'kysely'

/**
 * Running a trip after publishing: organisers close and reopen sales. A closed trip stays visible
 * (and its bookings stand) but takes no new holds. Existing trips start open, as they were.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').addColumn('sales_open', 'integer', (c) => c.notNull().defaultTo(1)).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('trips').dropColumn('sales_open').execute()
}
