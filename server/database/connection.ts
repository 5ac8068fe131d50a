import { mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import SQLite from 'better-sqlite3'
import { Kysely, sql, SqliteDialect, type Migration } from 'kysely'
import { migrations } from './migrations'
import type { Database } from './schema'

/** Opens the SQLite file (creating its folder), with WAL, foreign keys and a busy timeout. */
export function openDatabase(path: string): Kysely<Database> {
  const file = path === ':memory:' ? path : resolve(path)
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true })
  const sqlite = new SQLite(file)
  sqlite.pragma('journal_mode = WAL')
  sqlite.pragma('foreign_keys = ON')
  sqlite.pragma('busy_timeout = 5000')
  sqlite.pragma('synchronous = NORMAL')
  return new Kysely<Database>({ dialect: new SqliteDialect({ database: sqlite }) })
}

/**
 * Runs every pending migration, each in its own transaction together with the record that it ran,
 * so a crash or an error halfway leaves the database exactly as it was before that migration
 * (Kysely's Migrator does not wrap SQLite migrations in transactions). Throws with the failing
 * migration's name. Databases migrated by earlier versions (table kysely_migration) are adopted.
 */
export async function migrateToLatest(db: Kysely<Database>, set: Record<string, Migration> = migrations): Promise<string[]> {
  const raw = db as unknown as Kysely<Record<string, Record<string, string>>>
  await sql`create table if not exists schema_migrations (name text primary key, applied_at text not null)`.execute(db)
  const legacy = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name = 'kysely_migration'`.execute(db)
  if (legacy.rows.length) await sql`insert or ignore into schema_migrations (name, applied_at) select name, timestamp from kysely_migration`.execute(db)
  const done = new Set((await raw.selectFrom('schema_migrations').select('name').execute()).map((r) => r.name))
  const ran: string[] = []
  for (const name of Object.keys(set).sort()) {
    if (done.has(name)) continue
    try {
      await db.transaction().execute(async (trx) => {
        await set[name]!.up(trx)
        await (trx as unknown as typeof raw).insertInto('schema_migrations').values({ name, applied_at: new Date().toISOString() }).execute()
      })
    } catch (e) {
      throw new Error(`migration ${name} failed: ${e instanceof Error ? e.message : String(e)}`, { cause: e })
    }
    ran.push(name)
  }
  return ran
}

/**
 * An online, consistent copy of the database (SQLite's VACUUM INTO: a snapshot taken inside one
 * read transaction, so writers may go on meanwhile). Returns the file written.
 */
export async function backupDatabase(db: Kysely<Database>, file: string): Promise<string> {
  const target = resolve(file)
  mkdirSync(dirname(target), { recursive: true })
  await sql`vacuum into ${target}`.execute(db)
  return target
}
