import { randomUUID } from 'node:crypto'
import { generate } from 'otplib'
import { E2E_NOW } from './clock'
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

test('with the staff rule on, a guide without two-factor is sent from any page to set it up, with a plain message', async ({ page, browser }) => {
  const password = 'a-long-enough-password'
  const register = async (role: string) => {
    const email = `${role}-${randomUUID().slice(0, 8)}@umbrafield.test`
    expect((await page.request.post('/api/auth/register', { data: { name: `Rule Test ${role} (demo)`, email, password } })).status()).toBe(202)
    return email
  }
  // A fresh organiser with two-factor already on turns the rule on and off, so the demo accounts used
  // by other tests are never locked out, even if this test fails half-way.
  const orgEmail = await register('organiser')
  const guideEmail = await register('guide')
  await signInAs(page, 'organiser@umbrafield.test')
  const ids: Record<string, number> = {}
  for (const email of [orgEmail, guideEmail]) {
    const ctx = await browser.newContext({ baseURL: test.info().project.use.baseURL })
    await ctx.request.post('/api/auth/login', { data: { email, password } })
    ids[email] = (await (await ctx.request.get('/api/me')).json()).id
    await ctx.close()
  }
  expect((await page.request.patch(`/api/users/${ids[orgEmail]}`, { data: { role: 'organiser' } })).status()).toBe(200)
  expect((await page.request.patch(`/api/users/${ids[guideEmail]}`, { data: { role: 'guide' } })).status()).toBe(200)
  await page.request.post('/api/auth/logout')

  await signInAs(page, orgEmail, password)
  const { secret } = await (await page.request.post('/api/me/totp')).json()
  expect((await page.request.post('/api/me/totp/confirm', { data: { code: await generate({ secret }) } })).status()).toBe(200)
  try {
    await page.goto('/people')
    await hydrated(page)
    await page.getByRole('checkbox', { name: /Require two-factor sign-in for organisers and guides/ }).check()
    await expect(page.getByRole('status').filter({ hasText: 'Saved.' })).toBeVisible()

    const guideCtx = await browser.newContext({ baseURL: test.info().project.use.baseURL })
    const guide = await guideCtx.newPage()
    await guide.clock.install({ time: E2E_NOW })
    await signInAs(guide, guideEmail, password)
    await expect(guide).toHaveURL(/\/account\?setup=two-factor/)
    await expect(guide.getByRole('alert').filter({ hasText: 'Your organisation asks every organiser and guide' })).toBeVisible()
    // Another staff page sends them back.
    await guide.goto('/plan')
    await expect(guide).toHaveURL(/\/account\?setup=two-factor/)
    await expect(guide.getByRole('button', { name: 'Set up two-factor sign-in' })).toBeVisible()
    await guideCtx.close()
  } finally {
    expect((await page.request.patch('/api/settings/security', { data: { requireStaffTotp: false } })).status()).toBe(200)
  }
})
