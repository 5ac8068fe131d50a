import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

const INBOX = `http://127.0.0.1:${process.env.MAIL_FAKE_WEB_PORT}`

test('the organiser decides, sees who has it, and a participant acknowledges through the link', async ({ page, browser, request }) => {
  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/trips/1/decision')
  const form = page.getByRole('form', { name: 'Make the day\'s decision' })
  await form.getByLabel('Site', { exact: true }).selectOption({ label: 'Qena plateau (backup)' })
  await form.getByLabel(/Leave at/).fill('2027-08-02T05:00')
  await form.getByLabel(/Meeting point/).fill('Qena bus station (demo)')
  await form.getByRole('button', { name: 'Decide and tell everyone' }).click()
  await expect(page.getByRole('status').filter({ hasText: 'Decision recorded' })).toBeVisible()
  await expect(page.getByRole('region', { name: 'The day\'s decision' })).toContainText('We go to Qena plateau')
  const table = page.getByRole('table', { name: 'Delivery and acknowledgement' })
  // The demo booking's two seats and the trip's guide.
  await expect(table.getByRole('row')).toHaveCount(4)
  await expect(page.getByRole('heading', { name: /0 of 3 acknowledged/ })).toBeVisible()

  // The booking holder's own message (not the one sent "for" the second seat), from the demo inbox.
  let link = ''
  await expect.poll(async () => {
    const list = (await (await request.get(`${INBOX}/api/email`)).json()) as Array<{ subject: string; text: string; to: Array<{ address: string }> }>
    const mine = list.find((m) => m.subject.startsWith('Eclipse day') && m.to[0]?.address === 'traveller2@umbrafield.test' && !m.text.includes('(for '))
    link = /\/ack\/[A-Za-z0-9_-]+/.exec(mine?.text ?? '')?.[0] ?? ''
    return link
  }, { timeout: 20_000 }).not.toBe('')
  await expect(table.getByRole('row').nth(1)).toContainText('sent', { timeout: 20_000 })

  // Another browser, signed out, as the participant would open the link.
  const other = await browser.newContext()
  const phone = await other.newPage()
  await gotoHydrated(phone, link)
  await expect(phone.getByText('Qena plateau')).toBeVisible()
  await phone.getByRole('button', { name: 'I have seen this' }).click()
  await expect(phone.getByRole('status')).toContainText('your guide knows you have seen this')
  await other.close()

  await page.reload()
  await hydrated(page)
  await expect(page.getByRole('heading', { name: /1 of 3 acknowledged/ })).toBeVisible()
  await expect(table.getByRole('row').nth(1)).toContainText('UTC')
  await expect(page.getByRole('button', { name: /Send again to the 2 who have not acknowledged/ })).toBeVisible()
})
