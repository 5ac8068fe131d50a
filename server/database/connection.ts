import { mkdirSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import SQLite from 'better-sqlite3'
import { Kysely, Migrator, SqliteDialect } from 'kysely'
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

/** Runs every pending migration; throws with the failing migration's name. */
export async function migrateToLatest(db: Kysely<Database>): Promise<string[]> {
  const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } })
  const { error, results } = await migrator.migrateToLatest()
  const failed = results?.find((r) => r.status === 'Error')
  if (error || failed) {
    throw new Error(`migration ${failed?.migrationName ?? ''} failed: ${error instanceof Error ? error.message : String(error)}`)
  }
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName)
}
