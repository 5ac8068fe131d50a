import { CompiledQuery, type Compilable, type Kysely } from 'kysely'
import { prepareText } from './prepared'
import type { Database } from './schema'

const MARK = '\u0000arg:'

/**
 * A hot statement whose shape never changes, built with Kysely (so it is type-checked like any
 * other) and compiled to SQL once per process instead of on every call: `build` is called once with
 * stand-ins for its arguments, and each stand-in's place among the compiled parameters is kept. A call
 * then sends that SQL with the call's values in those places. `build` must pass every argument to
 * the query as a value (never compute with it, never put it into SQL text), and its result must not
 * depend on the values. On PostgreSQL the text is also prepared once per connection (see prepared.ts).
 */
export function compiledOnce<A extends Record<string, unknown>, R>(build: (db: Kysely<Database>, arg: A) => Compilable<R>) {
  let compiled: { sql: string; slots: Array<{ name: string } | { value: unknown }> } | undefined
  return async (db: Kysely<Database>, values: A): Promise<R[]> => {
    if (!compiled) {
      const stand = new Proxy({}, { get: (_, k) => MARK + String(k) }) as A
      const q = build(db, stand).compile()
      // An argument computed with at build time leaves NaN or a mangled stand-in behind: refuse it.
      for (const p of q.parameters) {
        if (typeof p === 'number' && Number.isNaN(p)) throw new Error('compiledOnce: an argument was computed with while building')
        if (typeof p === 'string' && p.includes(MARK) && !(p.startsWith(MARK) && p.indexOf(MARK, 1) < 0)) throw new Error('compiledOnce: an argument was computed with while building')
      }
      if (q.sql.includes(MARK)) throw new Error('compiledOnce: an argument was put into the SQL text')
      compiled = {
        sql: q.sql,
        slots: q.parameters.map((p) => typeof p === 'string' && p.startsWith(MARK) ? { name: p.slice(MARK.length) } : { value: p }),
      }
      prepareText(q.sql)
    }
    const params = compiled.slots.map((s) => {
      if (!('name' in s)) return s.value
      if (!(s.name in values)) throw new Error(`compiledOnce: no value for ${s.name}`)
      return values[s.name]
    })
    return (await db.executeQuery(CompiledQuery.raw(compiled.sql, params) as CompiledQuery<R>)).rows
  }
}
