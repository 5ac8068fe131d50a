import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('an annular trip says "annularity" on its page and countdown, never "totality", and keeps filters on', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips')
  await page.getByRole('link', { name: /Punta del Este/ }).click()
  await expect(page.getByText(/Annular solar eclipse of 2027-02-06/)).toBeVisible()
  await expect(page.getByRole('cell', { name: 'C2 — annularity begins' })).toBeVisible()
  await expect(page.getByRole('note', { name: 'Eye safety' })).toContainText('keep viewers and filters on throughout')
  await expect(page.locator('main, body').first()).not.toContainText(/totality/i)

  const tripPath = new URL(page.url()).pathname
  await gotoHydrated(page, `${tripPath}/timetable`)
  const site = page.getByRole('article').first()
  await expect(site).toContainText('annularity begins')
  await expect(site.getByText('filters off')).toHaveCount(0)
  await site.getByRole('link', { name: 'Open countdown' }).click()
  await expect(page.getByTestId('next-cue')).toContainText('Partial phase begins')
  await expect(page.getByTestId('countdown')).toContainText('Annularity begins')
  await expect(page.getByTestId('countdown')).not.toContainText(/totality/i)
  await expect(page.getByRole('note', { name: 'Eye safety' })).toContainText('keep viewers and filters on throughout')
})

test('the countdown\'s next cue is the next in time, on the fixed test clock', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/countdown/4')
  await expect(page.getByTestId('next-cue')).toContainText('Partial phase begins')
  // Jump the page's clock to a minute after C2 at Luxor: the next cue must be one still to come,
  // never a filters-off cue whose time has passed.
  const t = await page.evaluate(async () => (await fetch('/api/trips/1/timetable')).json())
  const site = t.sites.find((s: { siteId: number }) => s.siteId === 4)
  const c2 = Date.parse(site.contacts.c2.utc)
  await page.clock.setSystemTime(new Date(c2 + 60_000))
  await page.clock.runFor(1000)
  const later = site.cues.filter((c: { utc: string }) => Date.parse(c.utc) > c2 + 61_000)
  await expect(page.getByTestId('next-cue')).toHaveText(later[0].label)
})
