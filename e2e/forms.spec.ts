import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('the seat field starts at 1, never offers "Hold 0 seat", and says in words what is wrong', async ({ page }) => {
  await signInAs(page, 'traveller@umbrafield.test')
  const trips = (await (await page.request.get('/api/trips')).json()).data as Array<{ id: number; title: string }>
  const luxor = trips.find((t) => /Luxor totality week/.test(t.title))!
  await gotoHydrated(page, `/trips/${luxor.id}`)
  const seats = page.getByLabel('Seats')
  await expect(seats).toHaveValue('1')
  await expect(page.getByRole('button', { name: 'Hold 1 seat and pay the deposit' })).toBeVisible()
  await seats.fill('0')
  await expect(page.getByRole('button', { name: /Hold 0 seat/ })).toHaveCount(0)
  await page.getByRole('button', { name: 'Hold seats and pay the deposit' }).click()
  await expect(page.getByRole('alert').filter({ hasText: 'Choose at least one seat' })).toBeVisible()
  await expect(seats).toHaveAttribute('aria-invalid', 'true')
  await expect(page.getByText(/Invalid body|seats:/)).toHaveCount(0)
})

test('a site form shows the server\'s message in words beside the field', async ({ page }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  const ws = await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'E2E plain forms' } })).json()
  expect((await page.request.post(`/api/workspaces/${ws.id}/sites`, { data: { name: 'Form check', lat: 25.9, lon: 32.7 } })).status()).toBe(201)
  await gotoHydrated(page, `/plan/${ws.id}`)
  await page.getByRole('table', { name: 'Site comparison' }).locator('tbody tr').filter({ hasText: 'Form check' }).click()
  // A height that was never set reads "not set", not "0 m".
  await expect(page.getByTestId('site-height')).toContainText('not set')
  await page.getByLabel('Height (m)').fill('20000')
  await page.getByRole('button', { name: 'Save' }).click()
  await expect(page.getByRole('alert').filter({ hasText: 'The height must be −500 to 9000 m' })).toBeVisible()
  await expect(page.getByText(/Invalid body|elevationM/)).toHaveCount(0)
  // Without a terrain model the fill button says so, in words, beside the same field.
  await page.getByRole('button', { name: 'Fill from the terrain model' }).click()
  await expect(page.getByRole('alert').filter({ hasText: /no terrain model yet/ })).toBeVisible()

  // The examples come from this workspace's own ground (its first site), and a town search that finds nothing says so.
  await expect(page.getByLabel('Latitude, longitude')).toHaveAttribute('placeholder', 'e.g. 25.9000, 32.7000')
  await page.getByRole('tab', { name: 'Town search' }).click()
  await page.getByLabel('Town (offline list of places)').fill('Qxzwv')
  await expect(page.getByTestId('town-none')).toHaveText(/No town in the offline list matches "Qxzwv"/)
})
