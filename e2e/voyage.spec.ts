import { expect, gotoHydrated, signInAs, test } from './fixtures'

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
