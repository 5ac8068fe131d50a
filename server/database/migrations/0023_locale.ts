import type { Kysely } from 'kysely'

/**
 * The language each account reads Umbrafield and its e-mails in: a BCP 47 tag from the supported
 * set (shared/i18n/locales.ts). Existing accounts read English, as before.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').addColumn('locale', 'text', col => col.notNull().defaultTo('en')).execute()
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await db.schema.alterTable('users').dropColumn('locale').execute()
}
