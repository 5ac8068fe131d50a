import { randomUUID } from 'node:crypto'
import { generate } from 'otplib'
import { expect, hydrated, signInAs, test } from './fixtures'

test('a traveller turns on two-factor sign-in on the account page, then signs in with a code', async ({ page }) => {
  const email = `two-factor-${randomUUID().slice(0, 8)}@umbrafield.test`
  const password = 'a-long-enough-password'
  expect((await page.request.post('/api/auth/register', { data: { name: 'Two Factor Browser', email, password } })).status()).toBe(202)
  await signInAs(page, email, password)

  await page.goto('/account')
  await hydrated(page)
  const section = page.getByRole('region', { name: 'Two-factor sign-in' })
  await section.getByRole('button', { name: 'Set up two-factor sign-in' }).click()
  await expect(section.getByRole('img', { name: /QR code/ })).toBeVisible()
  const secret = (await section.getByTestId('totp-secret').innerText()).replace(/\s+/g, '')
  expect(secret).toMatch(/^[A-Z2-7]{32}$/)
  // The server runs on real time here; the code is what an authenticator app would show now.
  await section.getByLabel('6-digit code from your app').fill(await generate({ secret }))
  await section.getByRole('button', { name: 'Turn on' }).click()
  const codes = page.getByRole('region', { name: 'Recovery codes' })
  await expect(codes.getByRole('listitem')).toHaveCount(10)
  await expect(section.getByText(/10 of 10 recovery codes left/)).toBeVisible()

  await page.getByRole('button', { name: 'Sign out', exact: true }).click()
  await page.waitForURL((u) => u.pathname === '/')
  await page.goto('/login')
  await hydrated(page)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  const code = page.getByLabel('Code from your app, or a recovery code')
  await expect(code).toBeFocused()
  // The code that turned it on is spent; the app's next code (30 s ahead, within the allowed drift) is not.
  await code.fill(await generate({ secret, epoch: Math.floor(Date.now() / 1000) + 30 }))
  await page.getByRole('button', { name: 'Verify and sign in' }).click()
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
  await expect(page.getByTestId('role-chip')).toHaveText('traveller')
})
