import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('a booked traveller opens the Luxor briefing from the booking: sequence, sky diagram, corona, what to bring, safety', async ({ page }) => {
  await signInAs(page, 'traveller2@umbrafield.test')
  await gotoHydrated(page, '/bookings')
  await page.getByRole('link', { name: /Luxor/ }).first().click()
  await page.getByRole('link', { name: /Your briefing/ }).click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Luxor')
  await expect(page.getByText(/At\s+Luxor West Bank/)).toBeVisible()
  const seq = page.getByRole('region', { name: 'What you will see, and when' })
  await expect(seq.locator('[data-step="beads"]')).toContainText('diamond ring')
  await expect(seq.locator('[data-step="filters-off"]')).toContainText('filters off')
  await expect(seq.locator('[data-step="c3"]')).toContainText('reverse')
  await expect(page.getByRole('img', { name: /Sky facing the Sun: C2 at \d+° altitude/ })).toBeVisible()
  await expect(page.getByRole('region', { name: 'The corona to expect' })).toContainText('not a prediction')
  await expect(page.getByRole('region', { name: 'What to bring' })).toContainText('ISO 12312-2')
  await expect(page.getByRole('note', { name: 'Eye safety' })).toContainText('ISO 12312-2')
  await page.screenshot({ path: 'test-results/briefing.png', fullPage: true })
})

test('a traveller without a booking on the trip is told there is no such trip', async ({ page }) => {
  // A new traveller of their own (other tests book the demo travellers onto Luxor); signing in needs
  // no confirmed address, holding seats does.
  const email = `no-booking-${Date.now()}@umbrafield.test`
  const made = await page.request.post('/api/auth/register', { data: { name: 'No Booking (test)', email, password: 'a-long-test-password-1' } })
  expect(made.status()).toBe(202)
  await signInAs(page, email, 'a-long-test-password-1')
  const res = await gotoHydrated(page, '/trips/1/briefing')
  expect(res?.status()).toBe(404)
})
