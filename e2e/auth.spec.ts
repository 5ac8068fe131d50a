import { expect, gotoHydrated, signInAs, test } from './fixtures'

test('the home page says what Umbrafield does, with no request leaving the machine', async ({ page }) => {
  await gotoHydrated(page, '/')
  await expect(page.getByRole('heading', { level: 1 })).toContainText('shadow')
  await expect(page.getByText('ISO 12312-2').first()).toBeVisible()
  const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily)
  expect(font).toContain('Work Sans')
  expect(await page.evaluate(() => document.fonts.check('16px "Work Sans"'))).toBe(true)
})

test('each role sees its own navigation', async ({ page }) => {
  const nav = page.getByRole('navigation', { name: 'Main' })
  await signInAs(page, 'traveller@umbrafield.test')
  await expect(nav.getByRole('link', { name: 'People' })).toHaveCount(0)
  await expect(page.getByTestId('role-chip')).toHaveText('traveller')
  await page.getByRole('button', { name: 'Sign out' }).click()

  await signInAs(page, 'guide@umbrafield.test')
  await expect(page.getByTestId('role-chip')).toHaveText('guide')
  await expect(nav.getByRole('link', { name: 'People' })).toHaveCount(0)
  await page.getByRole('button', { name: 'Sign out' }).click()

  await signInAs(page, 'organiser@umbrafield.test')
  await expect(page.getByTestId('role-chip')).toHaveText('organiser')
  await expect(nav.getByRole('link', { name: 'People' })).toBeVisible()
})

test('sign-in form shows field errors and the generic failure message', async ({ page }) => {
  await gotoHydrated(page, '/login')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByText('Enter a valid e-mail address')).toBeVisible()
  await page.getByLabel('E-mail').fill('organiser@umbrafield.test')
  await page.getByLabel('Password').fill('not-the-password')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByRole('alert')).toHaveText('E-mail or password is not right')
})

test('an organiser promotes a traveller on the People page; the traveller\'s session ends, and signing in again shows the new role', async ({ page, browser }) => {
  const travellerCtx = await browser.newContext()
  const traveller = await travellerCtx.newPage()
  await signInAs(traveller, 'traveller2@umbrafield.test')
  await expect(traveller.getByTestId('role-chip')).toHaveText('traveller')

  await signInAs(page, 'organiser@umbrafield.test')
  await gotoHydrated(page, '/people')
  await page.getByLabel('Role for Samir Okafor (demo traveller)').selectOption('guide')
  await expect(page.getByRole('status')).toHaveText('Role updated.')

  // A role change ends the person's sessions: the next page knows them no more.
  await gotoHydrated(traveller, '/account')
  await expect(traveller).toHaveURL(/\/login/)
  await signInAs(traveller, 'traveller2@umbrafield.test')
  await expect(traveller.getByTestId('role-chip')).toHaveText('guide')
  await travellerCtx.close()
})

test('a traveller who opens /people is told it is not for their role', async ({ page }) => {
  await signInAs(page, 'traveller@umbrafield.test')
  await gotoHydrated(page, '/people')
  await expect(page.getByRole('heading', { name: 'Not for your role' })).toBeVisible()
})

test('a signed-out visitor is sent to sign in and brought back', async ({ page }) => {
  await gotoHydrated(page, '/account')
  await expect(page).toHaveURL(/\/login\?next=(%2F|\/)account/)
  await page.getByLabel('E-mail').fill('guide@umbrafield.test')
  await page.getByLabel('Password').fill('eclipse-demo')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page).toHaveURL(/\/account$/)
})

test('unknown pages get the tidy 404', async ({ page }) => {
  const res = await gotoHydrated(page, '/no-such-page')
  expect(res?.status()).toBe(404)
  await expect(page.getByRole('heading', { name: 'Off the path' })).toBeVisible()
})

test('the eclipse page computes local circumstances', async ({ page }) => {
  await gotoHydrated(page, '/eclipses/2027-08-02')
  await page.getByLabel('Latitude (° N)').fill('25.6872')
  await page.getByLabel('Longitude (° E)').fill('32.6396')
  await page.getByRole('button', { name: 'Compute' }).click()
  await expect(page.getByRole('cell', { name: /C2/ })).toBeVisible()
  await expect(page.getByText(/^Central phase/).first().locator('..')).toContainText(/6m \d/)
})
