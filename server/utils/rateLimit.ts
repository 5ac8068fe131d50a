import type { H3Event } from 'h3'
import { countHit, RateLimitedError } from '../services/rateLimits'

export { LOCAL_KEYS_MAX, pruneRateLimits } from '../services/rateLimits'

/** 429 with Retry-After for a request over its limit. */
export function rateLimitedResponse(event: H3Event, e: RateLimitedError): Error {
  setResponseHeader(event, 'Retry-After', e.retryAfterSec)
  return createError({ statusCode: 429, statusMessage: 'Too many requests', message: e.message, data: { code: 'rate_limited', retryAfterSec: e.retryAfterSec } })
}

/**
 * Counts a request under `key` (see services/rateLimits: in memory on SQLite, shared in the database
 * on PostgreSQL); 429 with Retry-After when it is over `limit` in the sliding `windowMs`.
 */
export async function rateLimit(event: H3Event, key: string, limit: number, windowMs: number): Promise<void> {
  await dbReady()
  try {
    await countHit(useDb(), { key, limit, windowMs })
  } catch (e) {
    throw e instanceof RateLimitedError ? rateLimitedResponse(event, e) : e
  }
}
