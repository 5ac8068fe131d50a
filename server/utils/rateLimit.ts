import type { H3Event } from 'h3'

/**
 * A small sliding-window limiter for abuse-prone writes (sign-up per address, seat holds per
 * account). In-process: with several app instances each keeps its own count, so the limit is per
 * instance (see the README's notes on running several instances).
 */
const hits = new Map<string, number[]>()

export function rateLimit(event: H3Event, key: string, limit: number, windowMs: number) {
  const now = Date.now()
  const recent = (hits.get(key) ?? []).filter((t) => t > now - windowMs)
  if (recent.length >= limit) {
    const retryAfterSec = Math.ceil((recent[0]! + windowMs - now) / 1000)
    setResponseHeader(event, 'Retry-After', retryAfterSec)
    throw createError({ statusCode: 429, statusMessage: 'Too many requests', message: `Too many requests: try again in ${retryAfterSec} s`, data: { code: 'rate_limited', retryAfterSec } })
  }
  recent.push(now)
  hits.set(key, recent)
  // Forget idle keys now and then so the map stays small.
  if (hits.size > 10_000) for (const [k, v] of hits) if (!v.some((t) => t > now - windowMs)) hits.delete(k)
}
