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

  it('refuses a builder that computes with an argument, reads a property of one, or writes one into the SQL', async () => {
    const product = compiledOnce((d, p: { n: number }) => d.selectNoFrom([sql<number>`${p.n * 100}`.as('x')]))
    await expect(product(db, { n: 2 })).rejects.toThrow(/n was computed with/)
    const bits = compiledOnce((d, p: { n: number }) => d.selectNoFrom([sql<number>`${p.n | 0}`.as('x')]))
    await expect(bits(db, { n: 2 })).rejects.toThrow(/n was computed with/)
    const joined = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql<string>`${`prefix-${p.s}`}`.as('x')]))
    await expect(joined(db, { s: 'a' })).rejects.toThrow(/s was computed with/)
    const json = compiledOnce((d, p: { o: string }) => d.selectNoFrom([sql<string>`${JSON.stringify(p.o)}`.as('x')]))
    await expect(json(db, { o: 'a' })).rejects.toThrow(/o was computed with/)
    const method = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql<string>`${p.s.toUpperCase()}`.as('x')]))
    await expect(method(db, { s: 'a' })).rejects.toThrow(TypeError)
    const length = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql<number>`${p.s.length}`.as('x')]))
    await expect(length(db, { s: 'abc' })).rejects.toThrow(/undefined/)
    const nested = compiledOnce((d, p: { user: { id: number } }) => d.selectNoFrom([sql<number>`${p.user.id}`.as('x')]))
    await expect(nested(db, { user: { id: 1 } })).rejects.toThrow(/undefined/)
    const spread = compiledOnce((d, p: { a: number }) => d.selectNoFrom([sql<number>`${{ ...p }.a}`.as('x')]))
    await expect(spread(db, { a: 1 })).rejects.toThrow(/undefined/)
    const inText = compiledOnce((d, p: { s: string }) => d.selectNoFrom([sql.lit(p.s).as('x')]))
    await expect(inText(db, { s: 'a' })).rejects.toThrow(/s was computed with/)
  })

  it('passes an argument used twice, and one equal to a constant, each in its own place', async () => {
    const q = compiledOnce((d, p: { a: number; b: number }) => d.selectNoFrom([sql<number>`${p.a} * 10 + ${p.a}`.as('x'), sql<number>`${p.b} - ${5}`.as('y')]))
    expect(await q(db, { a: 5, b: 5 })).toEqual([{ x: 55, y: 0 }])
    expect(await q(db, { a: 2, b: 9 })).toEqual([{ x: 22, y: 4 }])
  })

  it('refuses a call missing a value', async () => {
    const q = compiledOnce((d, p: { a: number; b: number }) => d.selectNoFrom([sql<number>`${p.a} + ${p.b}`.as('x')]))
    await expect(q(db, { a: 1 } as { a: number; b: number })).rejects.toThrow(/no value for b/)
  })
})
