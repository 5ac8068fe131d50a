import { UnknownEclipseError } from '../services/eclipses'

/** Maps service errors to HTTP errors; anything unexpected stays a generic 500 (no stack reaches the client). */
export async function withServiceErrors<T>(fn: () => Promise<T> | T): Promise<T> {
  try {
    return await fn()
  } catch (e) {
    if (e instanceof UnknownEclipseError) {
      throw createError({ statusCode: 400, statusMessage: 'Unknown eclipse', message: e.message, data: { fields: { id: e.message } } })
    }
    throw e
  }
}
