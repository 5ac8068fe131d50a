import SQLite from 'better-sqlite3'
import { Kysely, sql, SqliteDialect } from 'kysely'
import { afterAll, describe, expect, it } from 'vitest'
import { compiledOnce } from '../../server/database/compiledOnce'
import { preparedName } from '../../server/database/prepared'
import type { Database } from '../../server/database/schema'

const db = new Kysely<Database>({ dialect: new SqliteDialect({ database: new SQLite(':memory:') }) })
afterAll(() => db.destroy())

describe('statements compiled once', () => {
  it('send each call\'s own values in their places, constants kept, and register the text for preparing', async () => {
    let builds = 0
    const q = compiledOnce((d, p: { a: number; b: string; c: number | null }) => {
      builds++
      return d.selectNoFrom([sql<number>`${p.a} + ${7}`.as('x'), sql<string>`${p.b} || ${'!'}`.as('y'), sql<number | null>`${p.c}`.as('z'), sql<number>`${p.a} * 2`.as('w')])
    })
    expect(await q(db, { a: 1, b: 'one', c: null })).toEqual([{ x: 8, y: 'one!', z: null, w: 2 }])
    expect(await q(db, { b: 'two', c: 3, a: 40 })).toEqual([{ x: 47, y: 'two!', z: 3, w: 80 }])
    expect(builds).toBe(1)
    const text = db.selectNoFrom([sql<number>`${1} + ${7}`.as('x'), sql<string>`${'a'} || ${'!'}`.as('y'), sql<number | null>`${null}`.as('z'), sql<number>`${1} * 2`.as('w')]).compile().sql
    expect(preparedName(text)).toMatch(/^umbrafield_\d+$/)
  })

  it('refuses a builder that computes with an argument or writes it into the SQL', async () => {
    const computed = compiledOnce((d, p: { n: number }) => d.selectNoFrom([sql<number>`${p.n * 100}`.as('x')]))
    await expect(computed(db, { n: 2 })).rejects.toThrow(/computed with/)
    const joined = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql<string>`${`prefix-${p.s}`}`.as('x')]))
    await expect(joined(db, { s: 'a' })).rejects.toThrow(/computed with/)
    const inText = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql.lit(p.s).as('x')]))
    await expect(inText(db, { s: 'a' })).rejects.toThrow(/SQL text/)
  })

  it('refuses a call missing a value', async () => {
    const q = compiledOnce((d, p: { a: number; b: number }) => d.selectNoFrom([sql<number>`${p.a} + ${p.b}`.as('x')]))
    await expect(q(db, { a: 1 } as { a: number; b: number })).rejects.toThrow(/no value for b/)
  })
})
