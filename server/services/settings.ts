import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../database/schema'
import { nowIso } from './clock'

/** App-wide settings: one JSON value per key in app_settings; a missing key reads as its default. */
export async function getSetting<T>(db: Kysely<Database> | Transaction<Database>, key: string, fallback: T): Promise<T> {
  const row = await db.selectFrom('app_settings').select('value').where('key', '=', key).executeTakeFirst()
  if (!row) return fallback
  try {
    return JSON.parse(row.value) as T
  } catch {
    return fallback
  }
}

/** Writes one setting (insert or replace), inside the caller's transaction when given one. */
export async function putSetting(db: Kysely<Database> | Transaction<Database>, key: string, value: unknown, actorId: number | null): Promise<void> {
  const row = { value: JSON.stringify(value), updated_at: nowIso(), updated_by: actorId }
  await db.insertInto('app_settings').values({ key, ...row })
    .onConflict((oc) => oc.column('key').doUpdateSet(row)).execute()
}
