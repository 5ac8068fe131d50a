import { expect, gotoHydrated, signInAs, test } from './fixtures'

const INBOX = `http://127.0.0.1:${process.env.MAIL_FAKE_WEB_PORT}`

test('the organiser previews and sends the itinerary; it lands in the demo inbox', async ({ page, request }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/trips/1/manage')
  await page.getByRole('button', { name: 'Send itinerary…' }).click()
  const preview = page.getByRole('region', { name: 'Itinerary preview' })
  await expect(preview).toContainText('It goes to 1 confirmed participant')
  await preview.getByRole('button', { name: 'Send to 1 participant' }).click()
  await expect(page.getByRole('status').filter({ hasText: 'Itinerary queued' })).toBeVisible()
  await expect.poll(async () => {
    const r = await request.get(`${INBOX}/api/email`)
    const list = (await r.json()) as Array<{ subject: string; to: Array<{ address: string }> }>
    return list.filter((m) => m.subject.includes('itinerary') && m.to[0]?.address === 'traveller2@umbrafield.test').length
  }, { timeout: 20_000 }).toBe(1)
  await gotoHydrated(page, '/outbox')
  await expect(page.getByRole('table', { name: 'Outbox' }).getByRole('row').filter({ hasText: 'itinerary' }).first()).toContainText('sent')
})
