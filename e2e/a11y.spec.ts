import AxeBuilder from '@axe-core/playwright'
import type { Page } from '@playwright/test'
import { expect, gotoHydrated, signInAs, test } from './fixtures'

/**
 * Every page, for every role that can open it, has no WCAG 2.2 A/AA violation that axe-core can find.
 * A page that fails prints each rule with its impact and the selectors of the offending nodes.
 *
 * Nothing is excluded from the scan. The maps are labelled regions whose text alternative is the site list
 * (PlanMap) or the cue list and tables beside them (VoyageMap), which axe judges like any other content.
 *
 * One judgement axe cannot make: a site marker on the planning map is a full 24 × 24 px button, but two sites a
 * few kilometres apart overlap at a continental zoom. WCAG 2.5.8 exempts targets whose position is essential
 * (a pin on a map) and targets with an equivalent control; each site also has a full-size button in the site
 * comparison table. So a marker's target-size finding is set aside only when axe says it is "partially obscured";
 * a marker smaller than 24 px still fails, and the test checks the equivalent buttons are there.
 */
const TAGS = ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22a', 'wcag22aa']

type Found = { page: string; rule: string; impact: string; nodes: string[] }

async function scan(page: Page, name: string): Promise<Found[]> {
  const { violations } = await new AxeBuilder({ page }).withTags(TAGS).analyze()
  const overlappingMarker = (rule: string, n: { target: unknown[]; failureSummary?: string }) =>
    rule === 'target-size' && String(n.target[0]).startsWith('button[aria-label="Site ') && /partially obscured/.test(n.failureSummary ?? '')
  return violations
    .map((v) => ({ ...v, nodes: v.nodes.filter((n) => !overlappingMarker(v.id, n)) }))
    .filter((v) => v.nodes.length > 0)
    .map((v) => ({
      page: name,
      rule: v.id,
      impact: v.impact ?? 'unknown',
      nodes: v.nodes.map((n) => `${n.target.join(' ')}${n.failureSummary ? ` — ${n.failureSummary.replace(/\s+/g, ' ').slice(0, 160)}` : ''}`),
    }))
}

/** Waits for the page's own data (no request left in flight for half a second), then scans it. */
async function visit(page: Page, url: string, found: Found[], ready?: (page: Page) => Promise<void>) {
  await gotoHydrated(page, url)
  await page.waitForLoadState('networkidle').catch(() => {})
  if (ready) await ready(page)
  found.push(...await scan(page, url))
}

/** Opens every chart's data table on the page (the state a reader who cannot see the chart uses), then scans again. */
async function withTables(page: Page, url: string, found: Found[]) {
  const toggles = page.getByRole('button', { name: /^Show as a table/ })
  const n = await toggles.count()
  // Each click turns its button into "Show as a chart", so the first remaining toggle is always the next one.
  for (let i = 0; i < n; i++) await toggles.first().click()
  if (n > 0) {
    await expect(page.getByRole('button', { name: /^Show as a chart/ })).toHaveCount(n)
    found.push(...await scan(page, `${url} (tables shown)`))
  }
}

function report(found: Found[]) {
  const lines = found.map((f) => `${f.page}: ${f.rule} [${f.impact}] on ${f.nodes.length} node(s)\n    ${f.nodes.join('\n    ')}`)
  if (lines.length) console.log(lines.join('\n'))
  const nodes = found.reduce((s, f) => s + f.nodes.length, 0)
  expect(found.map((f) => `${f.page}: ${f.rule} (${f.nodes.length})`), `${nodes} violating node(s)`).toEqual([])
}

const mapReady = async (page: Page) => {
  await expect(page.locator('.maplibregl-canvas')).toBeVisible({ timeout: 30_000 })
  await expect(page.getByRole('button', { name: /^Site / }).first()).toBeVisible({ timeout: 30_000 })
}

test.describe('accessibility (axe-core, WCAG 2.2 AA)', () => {
  test.describe.configure({ timeout: 240_000 })

  test('anonymous visitor', async ({ page }) => {
    const found: Found[] = []
    for (const url of ['/', '/trips', '/trips/1', '/login', '/register', '/forgot-password', '/reset-password?token=not-a-real-token', '/verify-email?token=not-a-real-token', '/ack/not-a-real-token', '/eclipses']) {
      await visit(page, url, found)
    }
    report(found)
  })

  test('traveller without a booking', async ({ page }) => {
    const found: Found[] = []
    await signInAs(page, 'traveller@umbrafield.test')
    for (const url of ['/', '/trips', '/trips/1', '/bookings', '/account']) await visit(page, url, found)
    await gotoHydrated(page, '/trips/1')
    await page.screenshot({ path: test.info().outputPath('trip.png'), fullPage: true })
    report(found)
  })

  test('traveller with a confirmed booking: bookings, participant forms, briefing, countdown', async ({ page }) => {
    const found: Found[] = []
    await signInAs(page, 'traveller2@umbrafield.test')
    const bookings = (await (await page.request.get('/api/bookings')).json()) as { data: Array<{ id: number }> }
    expect(bookings.data.length).toBeGreaterThan(0)
    for (const url of ['/trips/1', '/bookings', ...bookings.data.map((b) => `/bookings/${b.id}`), '/trips/1/briefing', '/trips/1/countdown/4', '/account']) {
      await visit(page, url, found)
      await withTables(page, url, found)
    }
    report(found)
  })

  test('guide: my trips, timetable, manifest, briefing, countdown, outlook, decision', async ({ page }) => {
    const found: Found[] = []
    await signInAs(page, 'guide@umbrafield.test')
    for (const url of ['/guide/trips', '/trips/1', '/trips/1/timetable', '/trips/1/manifest', '/trips/1/briefing', '/trips/1/countdown/4', '/trips/1/outlook', '/trips/1/decision', '/account']) {
      await visit(page, url, found)
      await withTables(page, url, found)
    }
    report(found)
  })

  test('organiser: planning, eclipses, trips, people, alerts, outbox, reconciliation, decision, outlook', async ({ page }) => {
    const found: Found[] = []
    await signInAs(page, 'organiser@umbrafield.test')
    const pages = ['/', '/plan', '/eclipses', '/eclipses/2027-08-02', '/trips', '/trips/new', '/trips/1', '/trips/1/manage', '/trips/1/edit',
      '/trips/1/timetable', '/trips/1/manifest', '/trips/1/briefing', '/trips/1/outlook', '/trips/1/decision', '/people', '/alerts', '/outbox', '/reconciliation', '/account']
    for (const url of pages) {
      await visit(page, url, found)
      await withTables(page, url, found)
    }
    await visit(page, '/plan/1', found, mapReady)
    // The equivalent of each map marker: a full-size button per site in the comparison table.
    const markers = await page.locator('.uf-site-marker').count()
    expect(markers).toBeGreaterThan(0)
    await expect(page.getByRole('table', { name: 'Site comparison' }).locator('tbody button[aria-pressed]')).toHaveCount(markers)
    for (const box of await page.locator('.uf-site-marker').evaluateAll((els) => els.map((e) => e.getBoundingClientRect()))) {
      expect(Math.min(box.width, box.height)).toBeGreaterThanOrEqual(24)
    }
    await withTables(page, '/plan/1', found)
    // For a look at the palette and the chart tables after the contrast fixes.
    await page.screenshot({ path: test.info().outputPath('plan-tables.png'), fullPage: true })
    report(found)
  })

  test('organiser: a voyage page', async ({ page }) => {
    test.setTimeout(180_000)
    const found: Found[] = []
    await signInAs(page, 'organiser@umbrafield.test')
    // A workspace of its own, so the other browser tests keep the demo workspace as seeded.
    const ws = await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'A11y at sea' } })).json() as { id: number }
    const res = await page.request.post(`/api/workspaces/${ws.id}/voyages`, {
      data: { name: 'Accessible crossing (demo)', departure: { lat: 36.7, lon: -4.4, utc: '2027-08-01T20:00:00Z' }, speedKn: 16, minSunAltitudeDeg: 10 },
      timeout: 120_000,
    })
    expect(res.ok(), await res.text()).toBe(true)
    const v = await res.json() as { id: number }
    await visit(page, `/voyages/${v.id}`, found, async (p) => {
      await expect(p.getByTestId('voyage-map')).toHaveAttribute('data-ready', 'true', { timeout: 30_000 })
    })
    await withTables(page, `/voyages/${v.id}`, found)
    report(found)
  })
})
