/**
 * "Today" (UTC date) for date-dependent business rules such as cancellation tiers.
 * Tests that depend on the date pin it with UMBRAFIELD_FIXED_DATE=YYYY-MM-DD. The variable is
 * honoured only while the app's public URL is local, so a stray setting can never change what
 * real travellers are refunded.
 */
export function businessDate(nowMs = Date.now()): string {
  const fixed = process.env.UMBRAFIELD_FIXED_DATE
  const appUrl = process.env.NUXT_PUBLIC_APP_URL ?? 'http://localhost:3000'
  if (fixed && /^\d{4}-\d{2}-\d{2}$/.test(fixed) && /^https?:\/\/(localhost|127\.0\.0\.1|\[::1\])(:\d+)?(\/|$)/.test(appUrl)) return fixed
  return new Date(nowMs).toISOString().slice(0, 10)
}
