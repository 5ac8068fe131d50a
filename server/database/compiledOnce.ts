import { CompiledQuery, type Compilable, type Kysely } from 'kysely'
import { prepareText } from './prepared'
import type { Database } from './schema'

const STAND = Symbol('compiledOnce stand-in')

/**
 * A stand-in for the argument `name` while the statement is built: an object Kysely passes through
 * as a parameter value. Any use of it as a value at build time (arithmetic, a template string,
 * JSON, a comparison with a number) throws, and reading a property of it (a nested argument, a
 * string method, `.length`) gives undefined, which the check below refuses.
 */
function standIn(name: string): object {
  const computed = () => { throw new Error(`compiledOnce: the argument ${name} was computed with while building`) }
  return new Proxy(Object.freeze({}), {
    get(_, k) {
      if (k === STAND) return name
      if (k === Symbol.toPrimitive || k === 'valueOf' || k === 'toString' || k === 'toJSON') return computed
      return undefined
    },
  })
}

/**
 * A hot statement whose shape never changes, built with Kysely (so it is type-checked like any
 * other) and compiled to SQL once per process instead of on every call: `build` is called once with
 * stand-ins for its arguments, and each stand-in's place among the compiled parameters is kept. A call
 * then sends that SQL with the call's values in those places. On PostgreSQL the text is also prepared
 * once per connection (see prepared.ts).
 *
 * The rules for `build`: every argument is a scalar passed to the query as a value; never compute
 * with one, put one into SQL text, read a property of one, or branch on one (`p.x ? … : …` would
 * always take the first branch: stand-ins are objects). What can be caught is refused at the first call.
 */
export function compiledOnce<A extends Record<string, unknown>, R>(build: (db: Kysely<Database>, arg: A) => Compilable<R>) {
  let compiled: { sql: string; slots: Array<{ name: string } | { value: unknown }> } | undefined
  return async (db: Kysely<Database>, values: A): Promise<R[]> => {
    if (!compiled) {
      const stands = new Map<string, object>()
      const args = new Proxy({}, {
        get: (_, k) => {
          const name = String(k)
          if (!stands.has(name)) stands.set(name, standIn(name))
          return stands.get(name)
        },
      }) as A
      const q = build(db, args).compile()
      const slots = q.parameters.map((p) => {
        const name = p !== null && typeof p === 'object' ? (p as { [STAND]?: string })[STAND] : undefined
        if (name !== undefined) return { name }
        // A constant: undefined comes from reading a property of a stand-in (or a missing argument).
        if (p === undefined) throw new Error('compiledOnce: a parameter is undefined (a property of an argument was read while building)')
        return { value: p }
      })
      compiled = { sql: q.sql, slots }
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
