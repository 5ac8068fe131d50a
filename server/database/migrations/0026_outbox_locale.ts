import type { Kysely } from 'kysely'

/**
 * The language each queued message was written in (a code from shared/i18n/locales.ts), so that
 * organisers can see which language a traveller was sent. Messages written before this read English.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('outbox').addColumn('locale', 'text', col => col.notNull().defaultTo('en')).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('outbox').dropColumn('locale').execute()
}
