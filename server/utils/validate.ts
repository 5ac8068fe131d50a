import type { H3Event } from 'h3'
import type { ZodError, ZodType } from 'zod'

/** Turns a zod error into { field: message } (first message per field; "_" for the whole body). */
export function fieldErrors(error: ZodError): Record<string, string> {
  const out: Record<string, string> = {}
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_'
    if (!(key in out)) out[key] = issue.message
  }
  return out
}

function badRequest(error: ZodError, what: string) {
  const fields = fieldErrors(error)
  return createError({
    statusCode: 400,
    statusMessage: 'Invalid input',
    message: `Invalid ${what}: ` + Object.entries(fields).map(([k, v]) => `${k}: ${v}`).join('; '),
    data: { fields },
  })
}

export function parseOr400<T>(schema: ZodType<T>, value: unknown, what = 'input'): T {
  const r = schema.safeParse(value)
  if (!r.success) throw badRequest(r.error, what)
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
