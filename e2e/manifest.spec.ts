import { expect, gotoHydrated, signInAs, test } from './fixtures'

// The demo traveller's Luxor booking has two invented participants: seat 1 complete, seat 2 only started.
test('a traveller fills in a participant and sees what is still missing; the organiser sees the manifest', async ({ page }) => {
  await signInAs(page, 'traveller2@umbrafield.test')
  await gotoHydrated(page, '/bookings')
  await page.getByRole('link', { name: /Luxor/ }).first().click()
  await expect(page.getByRole('heading', { name: 'Travellers on this booking' })).toBeVisible()
  const seat2 = page.getByRole('form', { name: 'Seat 2' })
  const missing = seat2.getByRole('note', { name: 'Still missing for seat 2' })
  await expect(missing).toContainText('passport number')
  await expect(missing).toContainText('emergency contact\'s phone')

  // A bad phone and a passport that runs out too soon are refused beside their fields.
  await seat2.getByLabel('Passport number').fill('DEMO7654321')
  await seat2.getByLabel('Passport expiry').fill('2027-09-30')
  await seat2.getByLabel('Contact\'s name').fill('Ada Okafor (demo)')
  await seat2.getByLabel('Contact\'s phone').fill('0491 570 159')
  await seat2.getByLabel('Relation').fill('sister-in-law')
  await seat2.getByRole('button', { name: 'Save seat 2' }).click()
  await expect(seat2.getByText(/international form/)).toBeVisible()
  await seat2.getByLabel('Contact\'s phone').fill('+61 491 570 159')
  await seat2.getByRole('button', { name: 'Save seat 2' }).click()
  await expect(seat2.getByText(/less than 6 months after the trip ends/)).toBeVisible()
  await seat2.getByLabel('Passport expiry').fill('2031-05-31')
  await seat2.getByRole('button', { name: 'Save seat 2' }).click()
  await expect(seat2.getByRole('status')).toHaveText('Saved.')
  // Only the dietary, medical and mobility notes may stay empty; the date of birth and room were given before.
  await expect(missing).toHaveCount(0)
  await expect(seat2.getByTestId('seat-complete')).toBeVisible()
  await expect(page.getByText('2 of 2 complete')).toBeVisible()

  await gotoHydrated(page, '/account')
  await page.getByRole('button', { name: 'Sign out', exact: true }).click()
  await expect(page.getByRole('banner').getByRole('link', { name: 'Sign in' })).toBeVisible()

  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/trips/1')
  await page.getByRole('link', { name: 'Manifest', exact: true }).click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText('Luxor')
  const list = page.getByRole('table', { name: 'Travellers' })
  await expect(list).toContainText('Lina Okafor (demo)')
  await expect(list).toContainText('DEMO7654321')
  await expect(page.getByRole('table', { name: 'Access log' })).toContainText('passport numbers, medical notes')
  await page.screenshot({ path: 'test-results/manifest.png', fullPage: true })
})

test('a guide sees the manifest without passport numbers or dates of birth', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/manifest')
  const list = page.getByRole('table', { name: 'Travellers' })
  await expect(list).toContainText('Samir Okafor (demo)')
  await expect(list).toContainText('mild asthma')
  await expect(list.getByRole('columnheader', { name: 'Passport' })).toHaveCount(0)
  await expect(page.getByText(/DEMO\d/)).toHaveCount(0)
  await expect(page.getByRole('table', { name: 'Access log' })).toHaveCount(0)
})
