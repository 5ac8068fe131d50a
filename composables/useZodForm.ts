import type { TypedSchema } from 'vee-validate'
import type { ZodType } from 'zod'
import { plainError } from '#shared/schemas/messages'

/** Adapts a zod 4 schema (shared with the server route) to vee-validate's typed-schema interface. */
export function zodSchema<T>(schema: ZodType<T>): TypedSchema<T, T> {
  return {
    __type: 'VVTypedSchema',
    async parse(values: unknown) {
      // The same words the server uses for a check that has no message of its own.
      const r = await schema.safeParseAsync(values, { error: plainError })
      if (r.success) return { value: r.data, errors: [] }
      const byPath = new Map<string, string[]>()
      for (const issue of r.error.issues) {
        const path = issue.path.join('.')
        byPath.set(path, [...(byPath.get(path) ?? []), localMessage(issue.message)])
      }
      return { errors: [...byPath].map(([path, errors]) => ({ path, errors })) }
    },
  } as TypedSchema<T, T>
}

/** Field messages from a 400 response ({ data: { fields } }) so server-side checks show beside the fields. */
export function serverFieldErrors(e: unknown): Record<string, string> {
  const data = (e as { data?: { data?: { fields?: Record<string, string> } } })?.data?.data
  return Object.fromEntries(Object.entries(data?.fields ?? {}).map(([k, m]) => [k, localMessage(m)]))
}

export function serverMessage(e: unknown, fallback = 'Something went wrong. Try again.'): string {
  const d = (e as { data?: { message?: string; statusMessage?: string; data?: unknown } })?.data
  return codeMessage(d?.data) ?? localMessage(d?.message || d?.statusMessage || fallback)
}
