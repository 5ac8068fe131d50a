import { readFileSync } from 'node:fs'
import { expect, gotoHydrated, signInAs, test } from './fixtures'

test.describe('organiser planning page', () => {
  test.beforeEach(async ({ page }) => {
    await signInAs(page, 'organiser@umbrafield.test')
    await gotoHydrated(page, '/plan')
    await page.getByRole('link', { name: /Strait of Gibraltar/ }).click()
    await expect(page.getByRole('heading', { name: /Strait of Gibraltar/ })).toBeVisible()
    await expect(page.locator('.maplibregl-canvas')).toBeVisible()
    // Markers come once the map has loaded its style and tiles, drawn in software (SwiftShader): slow on a busy machine.
    await expect(page.getByRole('button', { name: 'Site Luxor West Bank' })).toBeVisible({ timeout: 30_000 })
  })

  test('the map draws from local tiles, and the table ranks the demo sites', async ({ page }) => {
    const rows = page.getByRole('table', { name: 'Site comparison' }).locator('tbody tr')
    await expect(rows).toHaveCount(9)
    await expect(rows.first()).toContainText('Luxor West Bank') // pinned favourite on top
    await expect(page.getByText('partial, mag.')).toBeVisible()
    await expect(page.getByText(/Planning is not viewing advice/)).toBeVisible()
  })

  test('the demo cloud layer is drawn and labelled as demo data', async ({ page }) => {
    await expect(page.getByTestId('demo-cloud-label')).toHaveText('Demo data — not a real climatology')
    await expect(page.getByText('Cloud figures: Demo data — not a real climatology')).toBeVisible()
    await expect(page.getByLabel('Cloud layer opacity')).toBeVisible()
    await page.getByRole('table', { name: 'Site comparison' }).getByText('Jeddah corniche').click()
    await expect(page.getByTestId('cloud-source')).toContainText('Demo data — not a real climatology')
  })

  test('adds sites by coordinates (DMS), by town search, by clicking the map, and by CSV', async ({ page }) => {
    const rows = page.getByRole('table', { name: 'Site comparison' }).locator('tbody tr')
    await page.getByLabel('Latitude, longitude').fill(`25°17'35"N 32°33'14"E`)
    await page.getByLabel('Name (optional)').fill('Esna ridge')
    await page.getByRole('button', { name: 'Add site' }).click()
    await expect(rows.filter({ hasText: 'Esna ridge' })).toHaveCount(1)

    await page.getByRole('tab', { name: 'Town search' }).click()
    await page.getByLabel('Town (offline list of places)').fill('Hurghada')
    await page.getByRole('button', { name: 'Add Hurghada' }).click()
    await expect(rows.filter({ hasText: 'Hurghada' })).toHaveCount(1)

    await page.getByLabel('Add by clicking the map').check()
    const box = (await page.getByTestId('plan-map').boundingBox())!
    await page.mouse.click(box.x + box.width * 0.3, box.y + box.height * 0.7)
    await expect(rows.filter({ hasText: /^.*Site 12/ })).toHaveCount(1)
    await page.getByLabel('Add by clicking the map').uncheck()

    await page.getByRole('tab', { name: 'CSV file' }).click()
    await page.getByLabel(/CSV with columns/).setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from('name,lat,lon\nGood,25,32\nBad,abc,32\n') })
    await expect(page.getByRole('alert')).toContainText('Row 3: Latitude must be a decimal number')
    await expect(page.getByRole('button', { name: 'Import sites', exact: true })).toBeDisabled()
    await page.getByLabel(/CSV with columns/).setInputFiles({ name: 'good.csv', mimeType: 'text/csv', buffer: Buffer.from('name,lat,lon,elevation\nDendera,26.142,32.67,90\nAbydos,26.185,31.919,80\n') })
    await page.getByRole('button', { name: 'Import 2 sites' }).click()
    await expect(rows.filter({ hasText: 'Dendera' })).toHaveCount(1)
    await expect(rows.filter({ hasText: 'Abydos' })).toHaveCount(1)
  })

  test('dragging a site previews its duration in the browser and the server recomputes on drop', async ({ page }) => {
    const row = page.getByRole('table', { name: 'Site comparison' }).locator('tbody tr').filter({ hasText: 'Benghazi coast' })
    const before = await row.locator('td').nth(3).textContent()
    const marker = page.getByRole('button', { name: 'Site Benghazi coast' })
    const b = (await marker.boundingBox())!
    await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2)
    await page.mouse.down()
    await page.mouse.move(b.x + 4, b.y + 12, { steps: 5 })
    await expect(page.getByTestId('drag-preview')).toContainText(/preview|no eclipse/)
    const saved = page.waitForResponse((r) => r.url().includes('/api/sites/') && r.request().method() === 'PATCH')
    await page.mouse.move(b.x + 6, b.y + 20, { steps: 5 })
    await page.mouse.up()
    expect((await saved).status()).toBe(200)
    await expect.poll(async () => row.locator('td').nth(3).textContent()).not.toBe(before)
  })

  test('a row click selects the site and shows its fallbacks; exports download valid files', async ({ page }) => {
    await page.getByRole('table', { name: 'Site comparison' }).getByText('Sohag farmland').click()
    const panel = page.getByRole('region', { name: 'Site Sohag farmland' })
    await expect(panel.getByText('If the sky fails here, fall back to')).toBeVisible()
    await expect(panel.getByRole('listitem')).toHaveCount(5)

    const [geo] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'GeoJSON' }).click()])
    const fc = JSON.parse(readFileSync((await geo.path())!, 'utf8'))
    expect(fc.type).toBe('FeatureCollection')
    expect(fc.features.filter((f: { properties: { kind: string } }) => f.properties.kind === 'site').length).toBeGreaterThanOrEqual(9)
    const [gpx] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'GPX' }).click()])
    const text = readFileSync((await gpx.path())!, 'utf8')
    expect(text).toMatch(/<gpx version="1.1"/)
    expect((text.match(/<wpt /g) ?? []).length).toBeGreaterThanOrEqual(9)
  })
})

test('a guide sees the plan but cannot edit it', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/plan/1')
  await expect(page.getByRole('table', { name: 'Site comparison' })).toBeVisible()
  await expect(page.getByRole('heading', { name: 'Add candidate sites' })).toHaveCount(0)
})
