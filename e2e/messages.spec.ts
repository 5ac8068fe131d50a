import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('an organiser previews and sends a message to the confirmed travellers; it shows in the history and on the traveller\'s booking', async ({ page, browser }) => {
  const subject = `Early start ${Math.random().toString(36).slice(2, 7)}`
  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/trips/1/manage')
  const form = page.getByRole('form', { name: 'New message' })
  await form.getByLabel('Subject').fill(subject)
  await form.getByLabel('Message (plain text)').fill('The coach leaves at 05:30 sharp.\n<b>Bring</b> your ISO 12312-2 viewers.')
  await form.getByLabel('Confirmed bookings').check()
  await form.getByRole('button', { name: 'Preview…' }).click()
  const preview = page.getByRole('region', { name: 'Message preview' })
  // Other browser tests may have confirmed bookings on this trip too: the count is not pinned here.
  await expect(preview).toContainText(/It goes to \d+ (person|people)/)
  // The typed tag is shown as text in the preview, not applied.
  await expect(preview.frameLocator('iframe[title="Message preview"]').locator('body')).toContainText('<b>Bring</b> your ISO 12312-2 viewers.')
  await preview.getByRole('button', { name: /^Send to \d+ (person|people)$/ }).click()
  await expect(page.getByRole('status').filter({ hasText: 'Message queued' })).toHaveText(/^Message queued for \d+ (person|people); see the outbox\.$/)
  const history = page.getByRole('list', { name: 'Message history' })
  await expect(history.getByRole('listitem').first()).toContainText(subject)
  await expect(history.getByRole('listitem').first()).toContainText(/to confirmed bookings \(\d+\)/)

  const ctx = await browser.newContext()
  const trav = await ctx.newPage()
  await signInAs(trav, 'traveller2@umbrafield.test')
  await gotoHydrated(trav, '/bookings')
  await trav.getByRole('table', { name: 'My bookings' }).getByRole('link', { name: /Luxor totality week/ }).first().click()
  await trav.waitForURL(/\/bookings\/\d+$/)
  const messages = trav.getByRole('list', { name: 'Messages' })
  await expect(messages.getByRole('listitem').filter({ hasText: subject })).toContainText('The coach leaves at 05:30 sharp.')
  await ctx.close()
})

test('the bookings table filters by name, status and balance owed', async ({ page }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/trips/1/manage')
  const table = page.getByRole('table', { name: 'Bookings' })
  const rows = table.locator('tbody tr')
  await page.getByLabel('Name or e-mail').fill('okafor')
  await expect(rows.first()).toContainText('Samir Okafor')
  await expect(rows.filter({ hasNotText: 'Samir Okafor' })).toHaveCount(0)
  // The demo traveller's booking here is confirmed: no held one matches.
  await page.getByLabel('Status').selectOption('held')
  await expect(table).toContainText('No booking matches these filters.')
  await page.getByLabel('Status').selectOption('confirmed')
  await page.getByLabel('Balance').selectOption('true')
  await expect(rows.first()).toContainText('Samir Okafor')
  await expect(page.getByRole('link', { name: 'Export CSV' })).toHaveAttribute('href', /bookings\.csv\?q=okafor&status=confirmed&owing=true$/)
})
