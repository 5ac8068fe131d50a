import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { sql, type Kysely, type Migration } from 'kysely'
import { describe, expect, it } from 'vitest'
import { backupDatabase, migrateToLatest, openDatabase } from '../../server/database/connection'
import { migrations } from '../../server/database/migrations'
import type { Database } from '../../server/database/schema'

const tables = async (db: Kysely<Database>) => (await sql<{ name: string }>`select name from sqlite_master where type = 'table' order by name`.execute(db)).rows.map((r) => r.name)

describe('migrations', () => {
  it('a migration that fails halfway leaves the database as it was, and is not recorded', async () => {
    const db = openDatabase(':memory:')
    const ok: Migration = { up: async (d) => { await d.schema.createTable('first').addColumn('id', 'integer').execute() } }
    const broken: Migration = {
      up: async (d) => {
        await d.schema.createTable('half_done').addColumn('id', 'integer').execute()
        await sql`insert into first (id) values (1)`.execute(d)
        throw new Error('boom in the middle')
      },
    }
    await expect(migrateToLatest(db, { '0001_first': ok, '0002_broken': broken })).rejects.toThrow(/migration 0002_broken failed: boom in the middle/)
    expect(await tables(db)).toEqual(['first', 'schema_migrations'])
    expect((await sql<{ n: number }>`select count(*) as n from first`.execute(db)).rows[0]!.n).toBe(0)
    expect((await sql<{ name: string }>`select name from schema_migrations`.execute(db)).rows.map((r) => r.name)).toEqual(['0001_first'])
    // Fixed, it runs on the next start.
    const fixed: Migration = { up: async (d) => { await d.schema.createTable('half_done').addColumn('id', 'integer').execute() } }
    expect(await migrateToLatest(db, { '0001_first': ok, '0002_broken': fixed })).toEqual(['0002_broken'])
    await db.destroy()
  })

  it('the real migrations run from empty, and a second run does nothing', async () => {
    const db = openDatabase(':memory:')
    expect(await migrateToLatest(db)).toEqual(Object.keys(migrations).sort())
    expect(await migrateToLatest(db)).toEqual([])
    await db.destroy()
  })
})

describe('backups', () => {
  it('an online backup restores: the copy opens with the same rows', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'umbrafield-backup-'))
    const db = openDatabase(join(dir, 'live.sqlite'))
    await migrateToLatest(db)
    await db.insertInto('users').values({ email: 'a@b.test', name: 'A', role: 'traveller', password_hash: 'x' }).execute()
    const copy = await backupDatabase(db, join(dir, 'backups', 'copy.sqlite'))
    await db.insertInto('users').values({ email: 'c@d.test', name: 'C', role: 'traveller', password_hash: 'x' }).execute()
    await db.destroy()
    const restored = openDatabase(copy)
    expect((await restored.selectFrom('users').select('email').execute()).map((u) => u.email)).toEqual(['a@b.test'])
    expect(await migrateToLatest(restored)).toEqual([])
    await restored.destroy()
  })
})
