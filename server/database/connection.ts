import { chmodSync, closeSync, mkdirSync, openSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import SQLite from 'better-sqlite3'
import { CompiledQuery, Kysely, PostgresDialect, sql, SqliteDialect, SqliteDriver, type DatabaseConnection, type Migration } from 'kysely'
import pg from 'pg'
import { preparedName } from './prepared'
import { isPostgres, isPostgresUrl } from './dialect'
import { migrations } from './migrations'
import type { Database } from './schema'
import { nowIso } from '../services/clock'

/**
 * SQLite write transactions start with BEGIN IMMEDIATE: the write lock is taken at the start, so a
 * transaction that reads and then writes never fails half-way with SQLITE_BUSY when another process
 * (a backup, a script) holds the file; it waits up to the busy timeout instead. Within one process
 * Kysely's SQLite driver already runs one transaction at a time.
 */
class ImmediateSqliteDriver extends SqliteDriver {
  override async beginTransaction(connection: DatabaseConnection): Promise<void> {
    await connection.executeQuery(CompiledQuery.raw('begin immediate'))
  }
}
class ImmediateSqliteDialect extends SqliteDialect {
  constructor(private readonly cfg: ConstructorParameters<typeof SqliteDialect>[0]) { super(cfg) }
  override createDriver() { return new ImmediateSqliteDriver(this.cfg) }
}

/**
 * Opens the database: PostgreSQL when `target` is a postgres:// URL (a pooled pg client, pool size
 * from PG_POOL_MAX, default 10), otherwise the SQLite file at `target` (creating its folder) with WAL,
 * foreign keys and a busy timeout.
 */
export function openDatabase(target: string): Kysely<Database> {
  if (isPostgresUrl(target)) {
    const pool = new pg.Pool({ connectionString: target, max: Number(process.env.PG_POOL_MAX || 10) })
    // An idle pooled connection that the server drops (a restart, a failover) emits 'error' on the
    // pool; unhandled, that is an uncaught exception (which ends a plain Node process). The pool discards that client and opens a fresh
    // one for the next query, so logging is all there is to do.
    pool.on('error', (e) => console.error('[umbrafield] database connection lost (the pool reconnects):', e.message))
    // The same for a connection that is checked out but between queries (inside a transaction): the
    // query in flight fails on its own, and the pool drops the broken client when it is released.
    pool.on('connect', (client) => {
      client.on('error', (e) => console.error('[umbrafield] database connection lost in use:', e.message))
      // Statements compiled once go by name: parsed once per connection (see prepared.ts).
      const query = client.query.bind(client) as (...a: unknown[]) => unknown
      client.query = ((text: unknown, values?: unknown, callback?: unknown) => {
        const name = typeof text === 'string' && callback === undefined ? preparedName(text) : undefined
        return name ? query({ name, text, values }) : query(text, values, callback)
      }) as typeof client.query
    })
    return new Kysely<Database>({ dialect: new PostgresDialect({ pool }) })
  }
  const file = target === ':memory:' ? target : resolve(target)
  if (file !== ':memory:') mkdirSync(dirname(file), { recursive: true })
  const sqlite = new SQLite(file)
  sqlite.pragma('journal_mode = WAL')
  sqlite.pragma('foreign_keys = ON')
  sqlite.pragma('busy_timeout = 5000')
  sqlite.pragma('synchronous = NORMAL')
  // Erased and purged personal data is overwritten with zeros in the file, not merely marked free.
  sqlite.pragma('secure_delete = ON')
  return new Kysely<Database>({ dialect: new ImmediateSqliteDialect({ database: sqlite }) })
}

/** Advisory-lock key for migrations on PostgreSQL (any constant; "umbrafld" in ASCII). */
const MIGRATION_LOCK = 0x756d6272

/**
 * Runs every pending migration, each in its own transaction together with the record that it ran,
 * so a crash or an error halfway leaves the database exactly as it was before that migration
 * (Kysely's Migrator does not wrap SQLite migrations in transactions). Throws with the failing
 * migration's name. Databases migrated by earlier versions (table kysely_migration) are adopted.
 */
export async function migrateToLatest(db: Kysely<Database>, set: Record<string, Migration> = migrations): Promise<string[]> {
  const raw = db as unknown as Kysely<Record<string, Record<string, string>>>
  const pgsql = isPostgres(db)
  // PostgreSQL: several instances may start at once; a transaction-scoped advisory lock lets one
  // migrate while the others wait, and each re-reads what is done once it holds the lock.
  if (pgsql) {
    await db.transaction().execute(async (trx) => {
      await sql`select pg_advisory_xact_lock(${MIGRATION_LOCK})`.execute(trx)
      await sql`create table if not exists schema_migrations (name text primary key, applied_at text not null)`.execute(trx)
    })
  } else {
    await sql`create table if not exists schema_migrations (name text primary key, applied_at text not null)`.execute(db)
    const legacy = await sql<{ name: string }>`select name from sqlite_master where type = 'table' and name = 'kysely_migration'`.execute(db)
    if (legacy.rows.length) await sql`insert or ignore into schema_migrations (name, applied_at) select name, timestamp from kysely_migration`.execute(db)
  }
  const done = new Set((await raw.selectFrom('schema_migrations').select('name').execute()).map((r) => r.name))
  const ran: string[] = []
  for (const name of Object.keys(set).sort()) {
    if (done.has(name)) continue
    let applied = true
    try {
      await db.transaction().execute(async (trx) => {
        // Another instance may have applied it meanwhile: re-read under the lock (PostgreSQL: the
        // advisory lock; SQLite: the write lock BEGIN IMMEDIATE took).
        if (pgsql) await sql`select pg_advisory_xact_lock(${MIGRATION_LOCK})`.execute(trx)
        const already = await (trx as unknown as typeof raw).selectFrom('schema_migrations').select('name').where('name', '=', name).executeTakeFirst()
        if (already) { applied = false; return }
        await set[name]!.up(trx)
        await (trx as unknown as typeof raw).insertInto('schema_migrations').values({ name, applied_at: nowIso() }).execute()
      })
    } catch (e) {
      throw new Error(`migration ${name} failed: ${e instanceof Error ? e.message : String(e)}`, { cause: e })
    }
    if (applied) ran.push(name)
  }
  return ran
}

/**
 * An online, consistent copy of the database (SQLite's VACUUM INTO: a snapshot taken inside one
 * read transaction, so writers may go on meanwhile). Returns the file written.
 */
export async function backupDatabase(db: Kysely<Database>, file: string): Promise<string> {
  if (isPostgres(db)) throw new Error('on PostgreSQL, back up with pg_dump (see the README, "Running several instances")')
  const target = privateBackupFile(file)
  await sql`vacuum into ${target}`.execute(db)
  chmodSync(target, 0o600)
  return target
}

/**
 * Makes the empty file a backup is then written into, readable by its owner only. A backup holds
 * every account and booking: a folder made here is the owner's alone (0700). (A folder that already
 * exists is left as it is: it may be shared, like /tmp.) The file is created empty with mode 0600
 * first, which VACUUM INTO and pg_dump both write into, so it is never readable by others.
 */
export function privateBackupFile(file: string): string {
  const target = resolve(file)
  mkdirSync(dirname(target), { recursive: true, mode: 0o700 })
  closeSync(openSync(target, 'wx', 0o600))
  return target
}
