import type { H3Event } from 'h3'
import type { ZodError, ZodType } from 'zod'
import { plainError } from '../../shared/schemas/messages'

/** Turns a zod error into { field: message } (first message per field; "_" for the whole body). */
export function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_'
    if (!(key in out)) out[key] = issue.message
  }
  return out
}

/**
 * A 400 whose message is the fields' own plain messages ("Choose at least one seat"), never the keys:
 * forms show it as it is. `data.fields` keeps the keys so a form can put each message beside its field.
 */
function badRequest(error: ZodError) {
  const fields = fieldErrors(error)
  return createError({
    statusCode: 400,
    statusMessage: 'Invalid input',
    message: [...new Set(Object.values(fields))].map((m) => m.charAt(0).toUpperCase() + m.slice(1)).join('. '),
    data: { fields },
  })
}

export function parseOr400<T>(schema: ZodType<T>, value: unknown, _what = 'input'): T {
  // A check without a message of its own gets one in words (shared/schemas/messages.ts).
  const r = schema.safeParse(value, { error: plainError })
  if (!r.success) throw badRequest(r.error)
  return r.data
}

export async function readBodyAs<T>(event: H3Event, schema: ZodType<T>): Promise<T> {
  let body: unknown
  try {
    body = await readBody(event)
  } catch {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: 'The request body is not valid JSON', data: { fields: { _: 'not valid JSON' } } })
  }
  return parseOr400(schema, body ?? {}, 'body')
}

export function queryAs<T>(event: H3Event, schema: ZodType<T>): T {
  return parseOr400(schema, getQuery(event), 'query')
}

export function paramsAs<T>(event: H3Event, schema: ZodType<T>): T {
  return parseOr400(schema, getRouterParams(event, { decode: true }), 'path')
}
