/**
 * The one clock of the server. Every "now" goes through here, so tests and the demo can move time
 * instead of sleeping, and date-dependent rules all agree on the date.
 *
 * - `UMBRAFIELD_FIXED_DATE=YYYY-MM-DD` pins the business date (cancellation tiers, upcoming
 *   eclipses, reminders, the demo's choice of eclipses).
 * - `UMBRAFIELD_TEST_CLOCK=1` lets a test move this process's clock forward (advanceClock, reached
 *   through POST /_test/clock), for holds, offers and tokens that lapse.
 *
 * Both are honoured only while the app's public URL is local, so a stray setting can never change
 * what real travellers are charged or refunded, or when their holds lapse.
 *
 * Timestamps that the database fills in by itself (created_at defaults) use the database's own
 * clock; no rule compares them with a moved clock except "older than", which moving forward keeps true.
 */

const LOCAL_URL = /^https?:\/\/(localhost|127\.0\.0\.1|\[::1\])(:\d+)?(\/|$)/

/** Whether the app's public URL is on this machine (the only case where test settings count). */
function appIsLocal(): boolean {
  return LOCAL_URL.test(process.env.NUXT_PUBLIC_APP_URL ?? 'http://localhost:3000')
}

/** Milliseconds this process's clock has been moved forward by a test (never negative). */
let offsetMs = 0

/** Now, in milliseconds since 1970-01-01T00:00:00Z (UTC). */
export function nowMs(): number {
  return Date.now() + offsetMs
}

/** Now, as a Date. */
export function nowDate(): Date {
  return new Date(nowMs())
}

/** Now, as a UTC ISO 8601 string with milliseconds (the stored timestamp format). */
export function nowIso(): string {
  return nowDate().toISOString()
}

/**
 * "Today" (UTC date, YYYY-MM-DD) for date-dependent business rules such as cancellation tiers.
 * Tests and the demo pin it with UMBRAFIELD_FIXED_DATE (local app only).
 */
export function businessDate(atMs = nowMs()): string {
  const fixed = process.env.UMBRAFIELD_FIXED_DATE
  if (fixed && /^\d{4}-\d{2}-\d{2}$/.test(fixed) && appIsLocal()) return fixed
  return new Date(atMs).toISOString().slice(0, 10)
}

/** Whether tests may move this process's clock (UMBRAFIELD_TEST_CLOCK=1 on a local app). */
export function testClockEnabled(): boolean {
  return process.env.UMBRAFIELD_TEST_CLOCK === '1' && appIsLocal()
}

/** Moves this process's clock forward by `ms` (tests only); returns the new now. */
export function advanceClock(ms: number): string {
  if (!testClockEnabled()) throw new Error('The test clock is off (UMBRAFIELD_TEST_CLOCK=1 on a local app turns it on)')
  if (!Number.isFinite(ms) || ms < 0) throw new Error('The clock only moves forward')
  offsetMs += ms
  return nowIso()
}
