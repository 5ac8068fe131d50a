import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

test('an organiser publishes and edits a trip and assigns a guide, who opens its timetable from "My trips"', async ({ page }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  // With no `next`, an organiser starts on the trips list.
  await expect(page).toHaveURL(/\/trips$/)

  // A fresh draft in the demo workspace (made through the API the New-trip form uses).
  // The seeded demo workspace is the first for this eclipse; other browser tests add workspaces of their own.
  const ws = ((await (await page.request.get('/api/workspaces')).json()).data as Array<{ id: number; eclipseId: string }>)
    .filter((w) => w.eclipseId === '2027-08-02').sort((a, b) => a.id - b.id)[0]!
  const sites = (await (await page.request.get(`/api/workspaces/${ws.id}/sites`)).json()).data as Array<{ id: number; name: string }>
  const luxor = sites.find((s) => s.name === 'Luxor West Bank')!
  const made = await page.request.post('/api/trips', { data: {
    workspaceId: ws.id, primarySiteId: luxor.id, title: 'Nile expedition (e2e)', startDate: '2027-07-30', endDate: '2027-08-04',
    seats: 12, priceMinor: 180_000, depositMinor: 30_000, currency: 'EUR', balanceDueDate: '2027-05-01',
    cancellationTiers: [{ until: '2027-03-01', refundPct: 90 }], minGroupSize: 4,
    meetingPoint: { name: 'Quay (e2e)', lat: 25.7, lon: 32.64, time: '2027-08-02T06:00:00+03:00' },
  } })
  expect(made.status()).toBe(201)
  const id = (await made.json()).id as number

  // Publishing asks first, in the page.
  await gotoHydrated(page, `/trips/${id}`)
  const tools = page.getByRole('region', { name: 'Organiser tools' })
  await tools.getByRole('button', { name: 'Publish…' }).click()
  await expect(tools.getByRole('alertdialog')).toContainText('Publish this trip?')
  await tools.getByRole('button', { name: 'Yes, publish' }).click()
  await expect(tools.getByRole('status')).toContainText('Published')
  await expect(tools.getByText('Sales are open.')).toBeVisible()

  // Edit the published trip: title, seats and one more cancellation tier.
  await tools.getByRole('link', { name: 'Edit trip' }).click()
  await page.waitForURL(`**/trips/${id}/edit`)
  await hydrated(page)
  await page.getByLabel('Title').fill('Nile expedition, renamed (e2e)')
  await page.getByLabel('Seats', { exact: true }).fill('16')
  await page.getByRole('button', { name: 'Add a tier' }).click()
  await page.getByLabel('Tier 2: until').fill('2027-05-01')
  await page.getByLabel('Tier 2: refund %').fill('40')
  await page.getByRole('button', { name: 'Save changes' }).click()
  await expect(page.getByRole('status')).toHaveText('Saved 3 changes.')
  await gotoHydrated(page, `/trips/${id}`)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Nile expedition, renamed (e2e)')
  await expect(page.getByText('until 2027-05-01: 40 % of what you paid back')).toBeVisible()

  // Assign the demo guide on the manage page.
  await gotoHydrated(page, `/trips/${id}/manage`)
  const guides = page.getByRole('form', { name: 'Guides' })
  await guides.getByLabel(/Tomas Reyland/).check()
  await guides.getByRole('button', { name: 'Save guides' }).click()
  await expect(guides.getByRole('status')).toContainText('Saved: 1 guide on this trip.')

  // The guide signs in, lands on "My trips" and opens the trip's timetable from there.
  await page.getByRole('button', { name: 'Sign out', exact: true }).click()
  await page.waitForURL((u) => u.pathname === '/')
  await signInAs(page, 'guide@umbrafield.test')
  await expect(page).toHaveURL(/\/guide\/trips$/)
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('My trips')
  const card = page.getByRole('listitem').filter({ hasText: 'Nile expedition, renamed (e2e)' })
  await expect(card.getByRole('link', { name: 'Timetable PDF' })).toHaveAttribute('href', `/api/trips/${id}/timetable.pdf`)
  await expect(card.getByRole('link', { name: /Countdown: Luxor West Bank/ })).toBeVisible()
  await card.getByRole('link', { name: 'Timetable', exact: true }).click()
  await page.waitForURL(`**/trips/${id}/timetable`)
  await hydrated(page)
  await expect(page.getByRole('article').first()).toContainText('Totality')

  // On the trip page the guide sees their tools instead of the booking box.
  await gotoHydrated(page, `/trips/${id}`)
  await expect(page.getByRole('heading', { name: 'Your guide\'s tools' })).toBeVisible()
  await expect(page.getByRole('button', { name: /Hold \d+ seat/ })).toHaveCount(0)
})
