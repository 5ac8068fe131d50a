import { describe, expect, it } from 'vitest'
import type { ZodType } from 'zod'
import { FIELD_LABELS, plainError } from '../../shared/schemas/messages'

/**
 * Every field of every shared schema answers bad input in words: each message a check gives, or the
 * fallback for a check without one (plainError, which the server and the forms both use), names the
 * field in words — never zod's own English ("Too small: expected number to be >=1") nor a raw key
 * such as "radiusKm" or "lat".
 */
const modules = import.meta.glob('../../shared/schemas/*.ts', { eager: true }) as Record<string, Record<string, unknown>>

type AnySchema = ZodType & { _zod: { def: { type: string; shape?: Record<string, unknown> } }; shape?: Record<string, AnySchema> }
const isSchema = (v: unknown): v is AnySchema => !!v && typeof v === 'object' && '_zod' in v && typeof (v as AnySchema).safeParse === 'function'

/** zod's built-in English, which a person on a form should never read. */
const ZOD_ENGLISH = /^(Invalid input|Invalid option|Invalid string|Invalid element|Invalid key|Too small|Too big|Unrecognized key)|\bexpected\b.*\breceived\b|[<>]=/
/** Keys that are not words: camelCase, units glued on, or abbreviations. */
const rawKey = (k: string) => /[A-Z]/.test(k) || ['lat', 'lon', 'elev', 'totp', 'mu', 'l1', 'l2', 'x', 'y', 'd'].includes(k)
/** Besselian element symbols keep their standard names (x, y, d, μ, l1, l2: Explanatory Supplement ch. 8). */
const ELEMENT_SYMBOLS = new Set(['x', 'y', 'd', 'mu', 'l1', 'l2'])

const BAD_VALUES: unknown[] = [undefined, null, {}, [], '', 'not-a-number', -1e12, 1e12, 0.5, -1, 'x'.repeat(6000), [{}], Array.from({ length: 50 }, () => 1)]

function problemsOf(schemaName: string, schema: AnySchema) {
  const out: string[] = []
  let fields = 0, messages = 0
  const shape = schema._zod.def.type === 'object' ? (schema.shape ?? {}) as Record<string, AnySchema> : null
  const keys = shape ? Object.keys(shape) : ['_']
  for (const key of keys) {
    fields++
    for (const bad of BAD_VALUES) {
      const input = shape ? { [key]: bad } : bad
      const r = schema.safeParse(input, { error: plainError })
      if (r.success) continue
      for (const issue of r.error.issues) {
        if (shape && issue.path[0] !== key) continue
        messages++
        const m = issue.message
        if (ZOD_ENGLISH.test(m)) out.push(`${schemaName}.${key} (${JSON.stringify(bad)?.slice(0, 20)}): zod's own words "${m}"`)
        const raw = issue.path.filter((p): p is string => typeof p === 'string' && rawKey(p) && !ELEMENT_SYMBOLS.has(p))
        for (const k of raw) if (new RegExp(`\\b${k}\\b`).test(m)) out.push(`${schemaName}.${key}: the raw key "${k}" in "${m}"`)
      }
    }
  }
  return { out, fields, messages }
}

describe('plain messages in the shared schemas', () => {
  it('every field of every schema under shared/schemas answers bad input in words', () => {
    const problems: string[] = []
    let schemas = 0, fields = 0, messages = 0
    for (const [file, mod] of Object.entries(modules)) {
      for (const [name, value] of Object.entries(mod)) {
        if (!isSchema(value)) continue
        schemas++
        const r = problemsOf(`${file.split('/').pop()}:${name}`, value)
        problems.push(...r.out)
        fields += r.fields
        messages += r.messages
      }
    }
    expect([...new Set(problems)]).toEqual([])
    // The walk reached the schemas: a glob that found nothing would pass vacuously.
    expect(schemas).toBeGreaterThanOrEqual(30)
    expect(fields).toBeGreaterThanOrEqual(100)
    expect(messages).toBeGreaterThanOrEqual(500)
  })

  it.each([
    [{ code: 'invalid_type', path: ['radiusKm'], input: 'x', expected: 'number' }, 'Search radius must be a number'],
    [{ code: 'invalid_type', path: ['seats'], input: undefined, expected: 'number' }, 'Seats is required'],
    [{ code: 'too_small', path: ['items'], origin: 'array', minimum: 1 }, 'Choose at least 1 for checklist'],
    [{ code: 'too_big', path: ['notes'], origin: 'string', maximum: 2000 }, 'Notes is too long (at most 2000 characters)'],
    [{ code: 'invalid_value', path: ['wrap'], values: ['split', 'unwrap'] }, 'Wrapping must be one of: split, unwrap'],
    [{ code: 'custom', path: ['someNewField'] }, 'Some new field is not valid'],
  ])('the fallback for %j reads "%s"', (issue, want) => {
    expect(plainError(issue)).toBe(want)
  })

  it('labels no key with itself', () => {
    for (const [k, label] of Object.entries(FIELD_LABELS)) if (rawKey(k) && !ELEMENT_SYMBOLS.has(k)) expect(label, k).not.toBe(k)
  })
})
