import type { Kysely } from 'kysely'
import { isAutomaticSiteName } from '../../../shared/sites/names'

/**
 * Two facts about a site that its columns could not tell apart before:
 * - `elevation_source`: where its height came from ('given' by a person or an import, 'terrain' from the
 *   workspace's height model), or null when nobody set one (elevation_m then stays 0 and contacts are
 *   computed at sea level). Heights already stored as exactly 0 were the old default and become "not set".
 * - `name_auto`: 1 while the site still carries a name the planning page made up ("Best ground 1 (…)",
 *   "Site 3"); a trip using it cannot be published until it is renamed.
 */
export async function up(db: Kysely<any>): Promise<void> { // eslint-disable-line @typescript-eslint/no-explicit-any
  await db.schema.alterTable('sites').addColumn('elevation_source', 'text').execute()
  await db.schema.alterTable('sites').addColumn('name_auto', 'integer', (c) => c.notNull().defaultTo(0)).execute()
  await db.updateTable('sites').set({ elevation_source: 'given' }).where('elevation_m', '<>', 0).execute()
  const rows = await db.selectFrom('sites').select(['id', 'name']).execute() as Array<{ id: number; name: string }>
  const auto = rows.filter((r) => isAutomaticSiteName(r.name)).map((r) => r.id)
  if (auto.length) await db.updateTable('sites').set({ name_auto: 1 }).where('id', 'in', auto).execute()
}

export async function down(db: Kysely<any>): Promise<void> { // eslint-disable-line @typescript-eslint/no-explicit-any
  await db.schema.alterTable('sites').dropColumn('name_auto').execute()
  await db.schema.alterTable('sites').dropColumn('elevation_source').execute()
}
