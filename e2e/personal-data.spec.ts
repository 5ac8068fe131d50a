import { randomUUID } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { expect, hydrated, signInAs, test } from './fixtures'

test('a traveller downloads their data, then erases it from the account page; signing in then fails', async ({ page }) => {
  const email = `erase-me-${randomUUID().slice(0, 8)}@umbrafield.test`
  const password = 'a-long-enough-password'
  expect((await page.request.post('/api/auth/register', { data: { name: 'Erase Me Browser', email, password } })).status()).toBe(202)
  await signInAs(page, email, password)
  await page.goto('/account')
  await hydrated(page)

  const section = page.getByRole('region', { name: 'Your data' })
  const [download] = await Promise.all([page.waitForEvent('download'), section.getByRole('link', { name: 'Download my data' }).click()])
  expect(download.suggestedFilename()).toMatch(/^umbrafield-my-data-\d{4}-\d{2}-\d{2}\.json$/)
  const data = JSON.parse(readFileSync((await download.path())!, 'utf8'))
  expect(data.account).toMatchObject({ email, name: 'Erase Me Browser', role: 'traveller' })
  expect(data.emails.some((m: { to: string }) => m.to === email)).toBe(true)

  const form = section.getByRole('form', { name: 'Erase my data' })
  // Without the box ticked, nothing is sent.
  await form.getByLabel('Your password').fill(password)
  await form.getByRole('button', { name: 'Erase my data' }).click()
  await expect(form.getByText('Tick the box to confirm that this cannot be undone')).toBeVisible()
  // A wrong password is refused, and the account stays.
  await form.getByLabel('Your password').fill('not-my-password')
  await form.getByLabel(/I understand/).check()
  await form.getByRole('button', { name: 'Erase my data' }).click()
  await expect(form.getByRole('alert')).toHaveText('Password is not right')
  await expect(page).toHaveURL(/\/account$/)

  await form.getByLabel('Your password').fill(password)
  await form.getByRole('button', { name: 'Erase my data' }).click()
  await page.waitForURL((u) => u.pathname === '/login' && u.searchParams.get('erased') === '1')
  await hydrated(page)
  await expect(page.getByRole('status').filter({ hasText: 'have been erased' })).toBeVisible()

  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByRole('alert')).toHaveText('E-mail or password is not right')
})
