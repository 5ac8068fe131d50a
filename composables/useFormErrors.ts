import type { ZodType } from 'zod'
import { plainError } from '#shared/schemas/messages'

/**
 * One form's error messages, in words, beside its fields: from a 400's `data.fields` (the server's
 * plain messages, keyed by field) or from checking the route's own zod schema before sending.
 * `field(key)` is the message to show under that field; `general` is everything no field on the
 * form shows (pass the form's field keys), or the server's message when it named no field.
 */
export function useFormErrors(formFields: readonly string[] = []) {
  const fields = ref<Record<string, string>>({})
  const other = ref('')
  const shown = (k: string) => formFields.includes(k) || formFields.includes(k.split('.')[0]!)
  const general = computed(() => [other.value, ...Object.entries(fields.value).filter(([k]) => !shown(k)).map(([, m]) => m)]
    .filter(Boolean).map((m) => m.charAt(0).toUpperCase() + m.slice(1)).join('. '))
  function clear() { fields.value = {}; other.value = '' }
  /** Takes a failed request's errors; returns true when there were any. */
  function take(e: unknown, fallback?: string): boolean {
    clear()
    const f = serverFieldErrors(e)
    fields.value = f
    if (!Object.keys(f).length) other.value = serverMessage(e, fallback)
    return true
  }
  /** Checks values against the route's schema in the browser, with the same plain messages; true when valid. */
  function check<T>(schema: ZodType<T>, values: unknown): boolean {
    clear()
    const r = schema.safeParse(values, { error: plainError })
    if (r.success) return true
    const out: Record<string, string> = {}
    for (const issue of r.error.issues) {
      const k = issue.path.length ? issue.path.join('.') : '_'
      out[k] ??= localMessage(issue.message)
    }
    fields.value = out
    return false
  }
  const field = (key: string) => fields.value[key] ?? ''
  return { fields, general, field, take, check, clear }
}
