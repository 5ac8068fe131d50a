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
