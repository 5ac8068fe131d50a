import { NotFoundError } from '../services/planning'

/** 404 for a missing (or not visible) workspace or site; other service errors as in withServiceErrors. */
export async function withPlanningErrors<T>(fn: () => Promise<T> | T): Promise<T> {
  try {
    return await withServiceErrors(fn)
  } catch (e) {
    if (e instanceof NotFoundError) throw createError({ statusCode: 404, statusMessage: 'Not found', message: e.message })
    throw e
  }
}
