import { E2E_NOW } from './clock'
import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

test('an anonymous visitor switches to German in the header; the choice survives a reload and carries into a new account', async ({ page, browser }) => {
  await gotoHydrated(page, '/')
  await expect(page.locator('html')).toHaveAttribute('lang', 'en-GB')
  await page.getByRole('combobox', { name: 'Language' }).selectOption({ label: 'Deutsch' })
  await expect(page.getByRole('heading', { level: 1 })).toHaveText('Bringen Sie Ihre Gruppe dorthin, wo der Schatten fällt – und der Himmel klar ist.')
  await expect(page.getByRole('link', { name: 'Anmelden' }).first()).toBeVisible()
  await expect(page.locator('html')).toHaveAttribute('lang', 'de-DE')

  // The server renders the next page in German too (the switcher's cookie).
  await page.reload()
  await hydrated(page)
  await expect(page.locator('html')).toHaveAttribute('lang', 'de-DE')
  await expect(page.getByRole('navigation', { name: 'Hauptmenü' }).getByRole('link', { name: 'Finsternisse' })).toBeVisible()
  await page.getByRole('link', { name: 'Anmelden' }).first().click()
  await expect(page.getByRole('heading', { name: 'Anmelden' })).toBeVisible()
  await hydrated(page)
  // Checks in the browser speak German as well.
  await page.getByRole('button', { name: 'Anmelden' }).click()
  await expect(page.getByText('Geben Sie eine gültige E-Mail-Adresse ein')).toBeVisible()

  // Sign-up keeps the page's language for the new account...
  const email = `sprache-${Date.now()}@umbrafield.test`
  await gotoHydrated(page, '/register')
  await page.getByLabel('Vor- und Nachname').fill('Greta Beispiel (demo)')
  await page.getByLabel('E-Mail').fill(email)
  await page.getByLabel('Passwort (mindestens 10 Zeichen)').fill('sprache-passwort-1')
  await page.getByRole('button', { name: 'Konto erstellen' }).click()
  await expect(page.getByRole('status')).toContainText('Bitte sehen Sie in Ihr Postfach')

  // ...so signing in from an English browser with no language cookie reads German.
  const fresh = await browser.newContext({ locale: 'en-GB' })
  const other = await fresh.newPage()
  await other.clock.install({ time: E2E_NOW })
  await gotoHydrated(other, '/login')
  await expect(other.getByRole('heading', { name: 'Sign in' })).toBeVisible()
  await other.getByLabel('E-mail').fill(email)
  await other.getByLabel('Password').fill('sprache-passwort-1')
  await other.getByRole('button', { name: 'Sign in' }).click()
  await expect(other.getByRole('button', { name: 'Abmelden' })).toBeVisible()
  await expect(other.locator('html')).toHaveAttribute('lang', 'de-DE')
  await fresh.close()
})

test('a signed-in traveller chooses Español on the account page and the header speaks Spanish', async ({ page, request }) => {
  const email = `idioma-${Date.now()}@umbrafield.test`
  const r = await request.post('/api/auth/register', { data: { name: 'Lucía Ejemplo (demo)', email, password: 'idioma-clave-12' } })
  expect(r.status()).toBe(202)
  await signInAs(page, email, 'idioma-clave-12')
  await gotoHydrated(page, '/account')
  await page.getByLabel('Language for pages and e-mails').selectOption({ label: 'Español' })
  await page.getByRole('button', { name: 'Use this language' }).click()
  await expect(page.getByRole('status')).toHaveText('Idioma guardado.')
  const header = page.locator('header')
  await expect(header.getByRole('button', { name: 'Cerrar sesión' })).toBeVisible()
  await expect(header.getByRole('link', { name: 'Mis reservas' })).toBeVisible()
  await expect(page.getByTestId('role-chip')).toHaveText('viajero')
  await expect(page.getByRole('heading', { name: 'Su cuenta' })).toBeVisible()
  await expect(page.locator('html')).toHaveAttribute('lang', 'es-ES')

  // The account keeps it: a reload renders Spanish on the server, and the API says so.
  await page.reload()
  await hydrated(page)
  await expect(page.locator('header').getByRole('button', { name: 'Cerrar sesión' })).toBeVisible()
  expect((await (await page.request.get('/api/me')).json()).locale).toBe('es')
})
