import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('a party larger than the seats left is offered the waitlist for the whole party, and joins it', async ({ page, browser, baseURL }) => {
  // A small trip of its own: 6 seats, 4 of them held by another traveller.
  const orgCtx = await browser.newContext()
  const org = await orgCtx.newPage()
  await signInAs(org, 'organiser@umbrafield.test')
  const headers = { origin: baseURL! }
  const trips = await (await org.request.get('/api/trips')).json() as { data: Array<{ id: number; workspaceId: number; site: { id: number } }> }
  const luxor = trips.data[0]!
  const created = await org.request.post('/api/trips', { headers, data: {
    workspaceId: luxor.workspaceId, primarySiteId: luxor.site.id, title: `Small party trip ${Math.random().toString(36).slice(2, 6)} (test)`, startDate: '2027-07-31', endDate: '2027-08-03',
    seats: 6, priceMinor: 100_000, depositMinor: 20_000, currency: 'EUR', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' },
  } })
  expect(created.status()).toBe(201)
  const tripId = (await created.json()).id as number
  expect((await org.request.post(`/api/trips/${tripId}/publish`, { headers })).status()).toBe(200)
  await orgCtx.close()
  const otherCtx = await browser.newContext()
  const other = await otherCtx.newPage()
  await signInAs(other, 'traveller2@umbrafield.test')
  expect((await other.request.post(`/api/trips/${tripId}/bookings`, { headers, data: { seats: 4 } })).status()).toBe(201)
  await otherCtx.close()

  await signInAs(page, 'traveller@umbrafield.test')
  await gotoHydrated(page, `/trips/${tripId}`)
  await expect(page.getByText('2 of 6 seats left')).toBeVisible()
  // More than the whole trip: no waitlist offer (the waitlist takes no more than the trip has).
  await page.getByLabel('Seats').fill('7')
  await page.getByRole('button', { name: /Hold 7 seats/ }).click()
  await expect(page.getByText('This trip has 6 seats in all')).toBeVisible()
  await expect(page.getByRole('button', { name: /Join the waitlist/ })).toHaveCount(0)
  await page.getByLabel('Seats').fill('4')
  await page.getByRole('button', { name: /Hold 4 seats/ }).click()
  await expect(page.getByText('Only 2 seats are left. Join the waitlist for your party of 4')).toBeVisible()
  await page.getByRole('button', { name: 'Join the waitlist for 4 seats' }).click()
  await expect(page.getByRole('status')).toHaveText(/You are number 1 on the waitlist/)
  await expect(page.getByRole('button', { name: 'Join the waitlist for 4 seats' })).toHaveCount(0)
})
