import type { BrowserContext } from '@playwright/test'
import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

/**
 * Chooses the page language the way the header's switcher leaves it for a signed-in traveller: the
 * language cookie, and the account's own language (which wins over the cookie once signed in).
 */
async function speak(context: BrowserContext, baseURL: string, code: 'en' | 'de' | 'es' | 'fr') {
  await context.addCookies([{ name: 'umbrafield_locale', value: code, url: baseURL }])
  const r = await context.request.patch(`${baseURL}/api/me`, { data: { locale: code } })
  expect(r.status()).toBe(200)
}

// The demo traveller reads English in every other test: put it back whatever happened here.
test.afterEach(async ({ context, baseURL }) => {
  await context.request.patch(`${baseURL}/api/me`, { data: { locale: 'en' } }).catch(() => undefined)
})

test('a German traveller reads the briefing, the trip page and the booking in German', async ({ page, context, baseURL }) => {
  await signInAs(page, 'traveller2@umbrafield.test')
  await speak(context, baseURL!, 'en')
  await gotoHydrated(page, '/trips/1/briefing')
  await expect(page.getByRole('region', { name: 'What you will see, and when' })).toBeVisible()
  // Where the diamond ring shows on the Sun's disc, as the English step says it ("about 8 o'clock").
  const english = await page.locator('[data-step="beads"]').textContent()
  const hour = /about (\d+) o'clock/.exec(english ?? '')?.[1]
  expect(hour).toBeTruthy()
  // The shared safety text, written by code in shared/ on the live page too (not only in the server's render).
  const safetyNote = page.getByRole('note', { name: 'Eye safety' })
  await expect(safetyNote).toContainText('ISO 12312-2')
  await expect(safetyNote).not.toContainText('safety.lines')

  // The traveller switches to German: the same page now speaks German.
  await speak(context, baseURL!, 'de')
  await page.reload()
  await hydrated(page)
  const seq = page.getByRole('region', { name: 'Was Sie sehen werden und wann' })
  await expect(seq).toBeVisible()
  await expect(seq.locator('[data-step="beads"]')).toContainText('Perlschnurphänomen und Diamantring')
  await expect(seq.locator('[data-step="beads"]')).toContainText(`etwa bei ${hour} Uhr`)
  await expect(seq.locator('[data-step="filters-off"]')).toContainText('Filter ab')
  await expect(seq.locator('[data-step="partial-begins"]')).toContainText('Finsternisbrille')
  await expect(seq).not.toContainText('Watch through your eclipse viewer')
  // The eclipse's date as German writes it ("2. August 2027"), not 2027-08-02.
  await expect(page.getByText(/Ihr Briefing · Finsternis vom \d{1,2}\. [A-ZÄÖÜ][a-zäöü]+ \d{4}/)).toBeVisible()
  // Contact labels in German, with the trade's C1–C4.
  const sky = page.getByRole('region', { name: 'Wohin Sie schauen' })
  await expect(sky).toContainText('C2 – Beginn der Totalität')
  await expect(sky).toContainText('C3 – Ende der Totalität')
  await expect(page.getByRole('img', { name: /Himmel mit Blick zur Sonne: C2 in \d+° Höhe/ })).toBeVisible()
  await expect(page.getByRole('region', { name: 'Welche Korona zu erwarten ist' })).toContainText('keine Vorhersage')
  await expect(page.getByRole('region', { name: 'Was Sie mitbringen sollten' })).toContainText('ISO 12312-2')
  // Clock times keep their zone labels; UTC stays UTC.
  await expect(seq.getByText(/^\d{2}:\d{2}:\d{2} UTC$/).first()).toBeVisible()
  await page.screenshot({ path: 'test-results/briefing-de.png', fullPage: true })

  // The trip page: headings, the contact table and the booking box in German.
  await gotoHydrated(page, '/trips/1')
  await expect(page.getByRole('heading', { name: /^In Luxor West Bank/ })).toBeVisible()
  await expect(page.getByRole('note', { name: 'Augenschutz' })).toContainText('ISO 12312-2')
  await expect(page.getByRole('note', { name: 'Augenschutz' })).not.toContainText('safety.lines')
  await expect(page.getByText(/doc\.time\./)).toHaveCount(0)
  await expect(page.getByRole('columnheader', { name: 'Kontakt' })).toBeVisible()
  await expect(page.getByRole('columnheader', { name: /^Ortszeit/ })).toBeVisible()
  await expect(page.getByRole('cell', { name: 'C2 – Beginn der Totalität' })).toBeVisible()
  await expect(page.getByRole('heading', { name: 'Treffpunkt' })).toBeVisible()
  await expect(page.getByText(/Totale Sonnenfinsternis vom \d{1,2}\. August 2027/)).toBeVisible()
  await expect(page.getByText('pro Platz').first()).toBeVisible()
  await expect(page.getByText('Bei Stornierung')).toBeVisible()
  await page.screenshot({ path: 'test-results/trip-de.png', fullPage: true })

  // The booking: German labels, money written the German way (1.234,56 €).
  await page.getByRole('link', { name: 'Ihre Buchung' }).click()
  await expect(page).toHaveURL(/\/bookings\/\d+/)
  await hydrated(page)
  await expect(page.getByRole('heading', { name: 'Reisende dieser Buchung' })).toBeVisible()
  await expect(page.getByRole('heading', { name: 'Zahlungsübersicht' })).toBeVisible()
  await expect(page.getByText('Bezahlt', { exact: true })).toBeVisible()
  await expect(page.getByTestId('paid')).toHaveText(/^\d{1,3}(\.\d{3})*,\d{2}\s€$/)
  await expect(page.getByRole('form', { name: /^Platz 1 – Buchende Person/ })).toBeVisible()
  await expect(page.getByLabel('Vollständiger Name, genau wie im Reisepass').first()).toBeVisible()
  await page.screenshot({ path: 'test-results/booking-de.png', fullPage: true })
  // A field message from the shared schema, said in German beside its field (nothing is saved).
  const seat2 = page.getByRole('form', { name: /^Platz 2/ })
  await seat2.getByLabel(/^Mobiltelefon/).fill('0123')
  await seat2.getByRole('button', { name: 'Platz 2 speichern' }).click()
  await expect(seat2.getByText(/im internationalen Format ein, mit \+ und Landesvorwahl/)).toBeVisible()

  // Back to English: the English labels the other tests use are still there.
  await speak(context, baseURL!, 'en')
  await page.reload()
  await hydrated(page)
  await expect(page.getByRole('heading', { name: 'Travellers on this booking' })).toBeVisible()
  await expect(page.getByTestId('paid')).toHaveText(/^€[\d,]+\.\d{2}$/)
})

test('the countdown speaks French, red screen and all', async ({ page, context, baseURL }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await speak(context, baseURL!, 'fr')
  await gotoHydrated(page, '/trips/1/countdown/4')
  await expect(page.getByTestId('next-cue')).toContainText('La phase partielle commence')
  await expect(page.getByText('Prochaine étape')).toBeVisible()
  await expect(page.getByRole('note', { name: 'Protection des yeux' })).toBeVisible()
  await expect(page.getByTestId('last-sync')).toContainText('Dernière synchronisation')
  await expect(page.getByText(/heure locale · \d{2}:\d{2}:\d{2} UTC · filtres en place/)).toBeVisible()
  await page.screenshot({ path: 'test-results/countdown-fr.png', fullPage: true })
  await page.getByRole('button', { name: 'Écran rouge' }).click()
  await expect(page.getByTestId('countdown')).toHaveClass(/bg-black/)
  await speak(context, baseURL!, 'en')
})

test('a refusal the server explains by its code reads in the page language', async ({ page, context, baseURL }) => {
  // A new traveller of their own, in German from sign-up; holding seats needs a confirmed address, which this one lacks.
  const email = `sprache-${Date.now()}@umbrafield.test`
  const made = await page.request.post('/api/auth/register', { data: { name: 'Greta Beispiel (test)', email, password: 'ein-langes-passwort-1', locale: 'de' } })
  expect(made.status()).toBe(202)
  await signInAs(page, email, 'ein-langes-passwort-1')
  await context.addCookies([{ name: 'umbrafield_locale', value: 'de', url: baseURL! }])
  await gotoHydrated(page, '/trips/1')
  await page.getByRole('button', { name: /reservieren und anzahlen/ }).click()
  await expect(page.getByText('Bitte bestätigen Sie zuerst Ihre E-Mail-Adresse')).toBeVisible()
})
