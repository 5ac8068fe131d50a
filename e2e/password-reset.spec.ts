import { expect, hydrated, test } from './fixtures'

const INBOX = `http://127.0.0.1:${process.env.MAIL_FAKE_WEB_PORT}`

test('a traveller who forgot the password asks for a link, follows it from the e-mail, chooses a new one and signs in', async ({ page, request }) => {
  const email = `forgetful-${Date.now()}@umbrafield.test`
  await page.goto('/register')
  await hydrated(page)
  await page.getByLabel('Name').fill('Forgetful Traveller (demo)')
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password (10 characters or more)').fill('first-password-1')
  await page.getByRole('button', { name: 'Create account' }).click()
  await expect(page.getByRole('status')).toContainText('Check your inbox')

  await page.goto('/login')
  await hydrated(page)
  await page.getByRole('link', { name: 'Forgot your password?' }).click()
  await expect(page.getByRole('heading', { name: 'Forgot your password?' })).toBeVisible()
  await hydrated(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByRole('button', { name: 'Send me a link' }).click()
  await expect(page.getByRole('status')).toContainText('a link to choose a new password is on its way')

  let link = ''
  await expect.poll(async () => {
    const list = (await (await request.get(`${INBOX}/api/email`)).json()) as Array<{ subject: string; text: string; to: Array<{ address: string }> }>
    const mail = list.find((m) => m.to[0]?.address === email && m.subject === 'Choose a new password')
    link = /https?:\/\/\S+\/reset-password\?token=[A-Za-z0-9_-]+/.exec(mail?.text ?? '')?.[0] ?? ''
    return link
  }, { timeout: 20_000 }).not.toBe('')

  await page.goto(new URL(link).pathname + new URL(link).search)
  await hydrated(page)
  await expect(page.getByRole('heading', { name: 'Choose a new password' })).toBeVisible()
  await page.getByLabel('New password (10 characters or more)').fill('second-password-2')
  await page.getByLabel('The same password again').fill('second-password-X')
  await page.getByRole('button', { name: 'Set the new password' }).click()
  await expect(page.getByText('The two passwords differ')).toBeVisible()
  await page.getByLabel('The same password again').fill('second-password-2')
  await page.getByRole('button', { name: 'Set the new password' }).click()
  await page.waitForURL(/\/login\?password=changed/)
  await expect(page.getByRole('status')).toHaveText('Your new password is set: sign in with it.')

  await hydrated(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password', { exact: true }).fill('second-password-2')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
  await expect(page.getByTestId('role-chip')).toHaveText('traveller')

  // The link worked once: opened again, it is refused.
  await page.goto(new URL(link).pathname + new URL(link).search)
  await hydrated(page)
  await page.getByLabel('New password (10 characters or more)').fill('third-password-3')
  await page.getByLabel('The same password again').fill('third-password-3')
  await page.getByRole('button', { name: 'Set the new password' }).click()
  await expect(page.getByRole('alert')).toContainText('not valid any more')
})
