import { ridgeTiff } from '../server/database/seed/demoTerrain'
import { expect, gotoHydrated, signInAs, test } from './fixtures'

// Runs on a workspace of its own, so the other browser tests keep the demo workspace as seeded.
test('an organiser finds the best ground near Luxor, adds it, and a site behind a ridge is flagged at C2', async ({ page }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  const ws = await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'E2E best ground' } })).json()
  const demoCloud = (await (await page.request.get('/api/climatology')).json()).data.find((d: { demo: boolean }) => d.demo)
  expect((await page.request.patch(`/api/workspaces/${ws.id}`, { data: { climatologyId: demoCloud.id } })).status()).toBe(200)
  const luxor = { name: 'Luxor check', lat: 25.6872, lon: 32.6396, elevationM: 80 }
  for (const s of [luxor, { name: 'Qena check', lat: 26.1551, lon: 32.716, elevationM: 120 }]) {
    expect((await page.request.post(`/api/workspaces/${ws.id}/sites`, { data: s })).status()).toBe(201)
  }

  await gotoHydrated(page, `/plan/${ws.id}`)
  await expect(page.locator('.maplibregl-canvas')).toBeVisible()

  // The surface: legend, the best cell along the Nile, and a hover read-out.
  await page.getByTestId('surface-toggle').check()
  const legend = page.getByTestId('surface-legend')
  // The surface is worked out on the server on first use (over 100,000 cells): allow for a busy machine.
  await expect(legend).toContainText('Expected seen seconds', { timeout: 30_000 })
  await expect(legend).toContainText('Demo data')
  const best = (await legend.getByText(/Best cell/).textContent())!
  const [lat, lon] = best.match(/(-?\d+\.\d+)°, (-?\d+\.\d+)°/)!.slice(1).map(Number) as [number, number]
  expect(lat).toBeGreaterThan(24)
  expect(lat).toBeLessThan(28)
  expect(lon).toBeGreaterThan(30)
  expect(lon).toBeLessThan(34)
  const box = (await page.getByTestId('plan-map').boundingBox())!
  // The read-out follows the pointer over the drawn surface; the layer may still be drawing, so hover again until it answers.
  await expect(async () => {
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5)
    await page.mouse.move(box.x + box.width * 0.52, box.y + box.height * 0.5)
    await expect(page.getByTestId('surface-hover')).toContainText(/s central/, { timeout: 1000 })
  }).toPass({ timeout: 30_000 })

  // Best ground within 150 km of Luxor, at least as good as the candidates there.
  await page.getByLabel('Centre of the search (lat, lon)').fill(`${luxor.lat}, ${luxor.lon}`)
  await page.getByLabel('Within (km)').fill('150')
  await page.getByRole('button', { name: 'Find', exact: true }).click()
  const list = page.getByTestId('best-spots')
  await expect(list.locator('li')).toHaveCount(5)
  // Near-ties (within a few seconds) are listed nearest first, so the best is the largest figure listed.
  const listed = (await list.locator('li').getByText(/s expected/).allTextContents()).map((t) => Number(t.match(/([\d.]+) s expected/)![1]))
  const bestExpected = Math.max(...listed)
  const sites = (await (await page.request.get(`/api/workspaces/${ws.id}/sites`)).json()).data as Array<{ metrics: { expectedSec: number } }>
  for (const s of sites) expect(bestExpected).toBeGreaterThanOrEqual(s.metrics.expectedSec - 0.1)
  await page.getByRole('button', { name: 'Add spot 1 as a candidate site' }).click()
  const rows = page.getByRole('table', { name: 'Site comparison' }).locator('tbody tr')
  await expect(rows.filter({ hasText: 'Best ground 1' })).toHaveCount(1)

  // Terrain: an invented ridge across the Sun's direction at C2, 700 m out, standing above the Sun.
  const sun = (await (await page.request.get(`/api/eclipses/2027-08-02/local?lat=${luxor.lat}&lon=${luxor.lon}&elev=${luxor.elevationM}`)).json()).c2
  const heightM = Math.round(luxor.elevationM + 700 * Math.tan(((sun.apparentAltitudeDeg + 2) * Math.PI) / 180) + 50)
  await page.getByLabel('GeoTIFF (up to 25 MB)').setInputFiles({ name: 'ridge.tif', mimeType: 'image/tiff', buffer: Buffer.from(ridgeTiff({ lat: luxor.lat, lon: luxor.lon, azimuthDeg: sun.azimuthDeg, distanceKm: 0.7, heightM })) })
  await page.getByRole('button', { name: 'Upload terrain' }).click()
  await expect(page.getByText(/Loaded "ridge.tif"/)).toBeVisible()
  await expect(page.getByTestId('terrain-list')).toContainText('ridge.tif')
  await rows.filter({ hasText: 'Luxor check' }).click()
  const horizon = page.getByTestId('site-horizon')
  await expect(horizon).toContainText(/C2: Sun .* blocked by the terrain/)
  await expect(horizon.getByRole('img', { name: /Horizon profile/ })).toBeVisible()
  await page.screenshot({ path: 'test-results/best-ground.png', fullPage: true })
})
