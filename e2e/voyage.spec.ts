import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

// Runs on a workspace of its own, so the other browser tests keep the demo workspace as seeded.
test('an organiser plans a voyage from the planning page and reads its timetable in ship\'s time and UTC', async ({ page }) => {
  test.setTimeout(120_000)
  await signInAs(page, 'organiser@umbrafield.test')
  const ws = await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'E2E at sea' } })).json()
  await gotoHydrated(page, `/plan/${ws.id}`)
  const panel = page.getByRole('region', { name: 'At sea' })
  await panel.getByLabel('Voyage name').fill('Alboran intercept (demo)')
  await panel.getByLabel('Port latitude (°N)').fill('36.70')
  await panel.getByLabel('Port longitude (°E)').fill('-4.40')
  await panel.getByLabel(/Leaving \(UTC/).fill('2027-08-01T20:00:00Z')
  await panel.getByLabel('Speed (knots)').fill('16')
  await panel.getByRole('button', { name: 'Plan the voyage' }).click()
  await page.waitForURL(/\/voyages\/\d+$/, { timeout: 60_000 })
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Alboran intercept (demo)')
  const table = page.getByRole('table').first()
  await expect(table).toContainText("Ship's time")
  await expect(table.getByRole('row', { name: /C2/ })).toContainText(/\d\d:\d\d:\d\d \([+-]\d\d:\d\d\)/)
  await expect(page.getByRole('note', { name: 'Eye safety' })).toContainText('ISO 12312-2')
  await expect(page.locator('.maplibregl-canvas')).toBeVisible()
  await expect(page.getByTestId('voyage-map')).toHaveAttribute('data-ready', 'true', { timeout: 30_000 })
  // Ship's time and UTC name the same second in every cue line (rounded once).
  for (const line of await page.getByRole('listitem').filter({ hasText: "ship's time ·" }).allTextContents()) {
    const [, local, utc] = line.match(/(\d\d:\d\d:\d\d) ship's time · (\d\d:\d\d:\d\d) UTC/)!
    expect(local!.slice(3), line).toBe(utc!.slice(3))
  }
  await page.screenshot({ path: test.info().outputPath('voyage-desktop.png'), fullPage: true })
  await page.setViewportSize({ width: 390, height: 844 })
  await page.screenshot({ path: test.info().outputPath('voyage-phone.png'), fullPage: true })
})

/** A workspace of its own with one voyage, planned through the API (the form is tested above). */
async function plannedVoyage(page: import('@playwright/test').Page, wsName: string, holdCourse?: { headingDeg: number; speedKn: number }) {
  await signInAs(page, 'organiser@umbrafield.test')
  const ws = await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: wsName } })).json()
  const res = await page.request.post(`/api/workspaces/${ws.id}/voyages`, {
    data: { name: 'Map check (demo)', departure: { lat: 36.7, lon: -4.4, utc: '2027-08-01T20:00:00Z' }, speedKn: 16, returnTo: { lat: 36.7, lon: -4.4 }, ...(holdCourse ? { holdCourse } : {}) },
  })
  expect(res.status()).toBe(201)
  return { ws, v: await res.json() }
}

test('the planning map draws the workspace\'s voyages, with a legend, a toggle and a list of links', async ({ page }) => {
  test.setTimeout(120_000)
  const { ws, v } = await plannedVoyage(page, 'E2E voyages on the map')
  await gotoHydrated(page, `/plan/${ws.id}`)
  const map = page.getByTestId('plan-map')
  // Route out and home, the hourly positions, the alternatives and the intercept: one feature each.
  const want = 2 + v.hourly.length + v.alternatives.length + 1
  await expect(map).toHaveAttribute('data-voyage-features', String(want), { timeout: 30_000 })
  const toggle = page.getByRole('checkbox', { name: /Voyages/ })
  await expect(page.getByTestId('voyage-legend')).toContainText('the ship every hour')
  await toggle.uncheck()
  await expect(map).toHaveAttribute('data-voyage-features', '0')
  await toggle.check()
  await expect(map).toHaveAttribute('data-voyage-features', String(want))
  // Keyboard users have the list: a link to the voyage and a button that shows it on the map.
  const list = page.getByRole('list', { name: 'Voyages of this workspace' })
  await expect(list.getByRole('link', { name: 'Map check (demo)' })).toHaveAttribute('href', `/voyages/${v.id}`)
  await list.getByRole('button', { name: 'Show Map check (demo) on the map' }).focus()
  await page.keyboard.press('Enter')
  await toggle.uncheck()
  await list.getByRole('button', { name: 'Show Map check (demo) on the map' }).click()
  await expect(toggle).toBeChecked()
  await map.scrollIntoViewIfNeeded()
  await map.screenshot({ path: test.info().outputPath('plan-voyages.png') })
})

/** Ship's time and UTC of an instant, rounded once to the second (half up), by Intl directly. */
function clocks(utc: string, zone: string) {
  const ms = Math.floor(Date.parse(utc) / 1000 + 0.5) * 1000
  const local = new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' }).format(new Date(ms))
  return { local, utc: new Date(ms).toISOString().slice(11, 19) }
}

test('the voyage countdown counts down to the under-way contacts and keeps working offline', async ({ page, context }) => {
  test.setTimeout(120_000)
  const { v } = await plannedVoyage(page, 'E2E voyage countdown', { headingDeg: 95, speedKn: 12 })
  await gotoHydrated(page, `/voyages/${v.id}`)
  await expect(page.getByRole('link', { name: 'Timetable (PDF)', exact: true })).toHaveAttribute('href', `/api/voyages/${v.id}/timetable.pdf`)
  await page.getByRole('link', { name: 'Open countdown' }).click()
  await page.waitForURL(`**/voyages/${v.id}/countdown`)
  await hydrated(page)
  const zone = v.timetable.zone
  const u = v.timetable.underway.contacts
  await expect(page.getByTestId('next-contact')).toHaveText('C1 — partial phase begins')
  const c1 = clocks(u.c1.utc, zone)
  await expect(page.getByTestId('next-times')).toHaveText(`at ${c1.local} ship's time · ${c1.utc} UTC`)
  // Every contact is listed under way (the ship's own C2 differs from lying stopped).
  const table = page.getByRole('table', { name: "Contacts in ship's time and UTC" })
  for (const [k, label] of [['c1', 'C1'], ['c2', 'C2'], ['max', 'Maximum'], ['c3', 'C3'], ['c4', 'C4']] as const) {
    const c = clocks(u[k].utc, zone)
    await expect(table.getByRole('row', { name: new RegExp(label) })).toContainText(`${c.local}${c.utc}`)
  }
  // Move the page's clock to a minute after the ship's C2: the next contact is maximum.
  await page.clock.pauseAt(new Date(Date.parse(u.c2.utc) + 60_000))
  await page.clock.runFor(1000)
  await expect(page.getByTestId('next-contact')).toHaveText('Maximum eclipse')
  const max = clocks(u.max.utc, zone)
  await expect(page.getByTestId('next-times')).toHaveText(`at ${max.local} ship's time · ${max.utc} UTC`)
  // The time left is the whole seconds (rounded up) to the maximum from the page's paused clock.
  const leftSec = Math.ceil((Date.parse(u.max.utc) - (Date.parse(u.c2.utc) + 61_000)) / 1000)
  await expect(page.getByTestId('countdown-value')).toHaveText(`${Math.floor(leftSec / 60)}:${String(leftSec % 60).padStart(2, '0')}`)
  await expect(page.getByRole('note', { name: 'Eye safety' })).toContainText('ISO 12312-2')
  await page.setViewportSize({ width: 390, height: 844 })
  await page.screenshot({ path: test.info().outputPath('voyage-countdown-phone.png'), fullPage: true })
  // Offline after the first load: the copy on this device and the cached page carry on.
  await expect(page.getByTestId('last-sync')).toContainText('ready offline', { timeout: 15_000 })
  await context.setOffline(true)
  await page.reload()
  await hydrated(page)
  await expect(page.getByTestId('next-contact')).toBeVisible()
  await expect(page.getByTestId('last-sync')).toContainText('Last synced')
  await context.setOffline(false)
})
