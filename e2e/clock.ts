/**
 * The day the browser tests live on: before the demo trips' first refund tiers end and before their
 * eclipses, so tests that depend on today's date pass whenever they run. The server gets it as
 * UMBRAFIELD_FIXED_DATE (playwright.config.ts); pages get it through Playwright's clock.
 */
export const E2E_DATE = '2026-12-01'
export const E2E_NOW = new Date(`${E2E_DATE}T10:00:00Z`)
