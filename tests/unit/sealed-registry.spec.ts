import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, relative, resolve } from 'node:path'
import { sql } from 'kysely'
import { describe, expect, it } from 'vitest'
import { migrateToLatest, openDatabase } from '../../server/database/connection'
import { SEALED_COLUMNS, SEALED_SETTINGS, SEALED_WRITERS } from '../../server/services/personalData/sealedColumns'

const root = resolve(__dirname, '../..')
function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f)
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : []
  })
}

const withoutComments = (src: string) => src.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|\s)\/\/.*$/gm, '$1')

describe('the registry of sealed columns (what keys:rotate re-seals)', () => {
  it('names every file under server/ that calls seal(), and nothing else', () => {
    const callers = files(join(root, 'server'))
      // sealed.ts defines seal(); rotate.ts re-seals exactly the registered columns.
      .filter((f) => !f.endsWith(join('services', 'sealed.ts')) && !f.endsWith(join('personalData', 'rotate.ts')))
      // A call of seal( itself (not unseal(, not a method named so), outside comments.
      .filter((f) => /(^|[^\w.])seal\(/m.test(withoutComments(readFileSync(f, 'utf8'))))
      .map((f) => relative(root, f).replace(/\\/g, '/'))
      .sort()
    expect(callers.length).toBeGreaterThanOrEqual(3)
    expect(callers, 'a file seals values but is not in SEALED_WRITERS (server/services/personalData/sealedColumns.ts)').toEqual(Object.keys(SEALED_WRITERS).sort())
  })

  it('every column a writer seals is in SEALED_COLUMNS', () => {
    const registered = new Set([...SEALED_COLUMNS.map((c) => `${c.table}.${c.column}`), ...SEALED_SETTINGS.map((s) => `app_settings:${s.key}`)])
    for (const [file, cols] of Object.entries(SEALED_WRITERS)) {
      for (const c of cols) expect(registered.has(c), `${file} writes ${c}`).toBe(true)
    }
  })

  it('lists every migrated column named *sealed*, and only columns that exist', async () => {
    const db = openDatabase(':memory:')
    await migrateToLatest(db)
    const tables = (await sql<{ name: string }>`select name from sqlite_master where type = 'table'`.execute(db)).rows.map((r) => r.name)
    const sealedInDb: string[] = []
    const all = new Set<string>()
    for (const t of tables) {
      for (const c of (await sql<{ name: string }>`select name from pragma_table_info(${t})`.execute(db)).rows) {
        all.add(`${t}.${c.name}`)
        if (/sealed/i.test(c.name)) sealedInDb.push(`${t}.${c.name}`)
      }
    }
    await db.destroy()
    expect(sealedInDb.length).toBeGreaterThanOrEqual(10)
    expect(sealedInDb.sort()).toEqual(SEALED_COLUMNS.map((c) => `${c.table}.${c.column}`).sort())
    for (const c of SEALED_COLUMNS) {
      for (const col of [c.key, ...c.reads]) expect(all.has(`${c.table}.${col}`), `${c.table}.${col}`).toBe(true)
    }
  })
})
