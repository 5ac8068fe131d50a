import { expect, gotoHydrated, hydrated, signInAs, test } from './fixtures'

test('the guide opens the demo trip timetable, prints every site, downloads the PDF', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/timetable')
  const sites = page.getByRole('article')
  await expect(sites).toHaveCount(3)
  await expect(sites.first()).toContainText('Totality')
  await expect(sites.first().getByRole('note', { name: 'Eye safety' })).toContainText('ISO 12312-2')
  await expect(sites.first().getByText(/filters off/).first()).toBeVisible()
  // Print: Chromium's own print rendering, one page per site
  await page.emulateMedia({ media: 'print' })
  const pdf = await page.pdf({ format: 'A4', printBackground: true })
  const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length
  expect(pages).toBeGreaterThanOrEqual(3)
  await page.emulateMedia({ media: 'screen' })
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download PDF' }).click()])
  expect(dl.suggestedFilename()).toMatch(/\.pdf$/)
})

test('the countdown keeps working after the browser goes offline', async ({ page, context }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/countdown/4')
  await expect(page.getByTestId('next-cue')).toContainText('Partial phase begins')
  await expect(page.getByTestId('last-sync')).toContainText('ready offline', { timeout: 15_000 })
  await context.setOffline(true)
  await page.reload()
  await hydrated(page)
  await expect(page.getByTestId('next-cue')).toContainText('Partial phase begins')
  const first = await page.getByTestId('countdown-value').textContent()
  // The countdown ticks on by itself (the page's clock runs from the fixed test time).
  await expect.poll(() => page.getByTestId('countdown-value').textContent()).not.toBe(first)
  await expect(page.getByTestId('last-sync')).toContainText('Last synced')
  await page.getByRole('button', { name: 'Red screen' }).click()
  await expect(page.getByTestId('countdown')).toHaveClass(/bg-black/)
  await context.setOffline(false)
})

test('recompute here uses the device location and is marked as differing from the plan', async ({ page, context }) => {
  await context.grantPermissions(['geolocation'])
  await context.setGeolocation({ latitude: 26.0, longitude: 32.2 })
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/countdown/4')
  await expect(page.getByTestId('next-cue')).toBeVisible()
  await page.getByRole('button', { name: /Recompute here/ }).click()
  await expect(page.getByRole('status')).toContainText('These times differ from the planned site')
})

test('signing out on a shared device clears the countdown\'s offline copies', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  await gotoHydrated(page, '/trips/1/countdown/4')
  await expect(page.getByTestId('last-sync')).toContainText('ready offline', { timeout: 15_000 })
  const kept = () => page.evaluate(async () => ({
    saved: Object.keys(localStorage).filter((k) => k.startsWith('umbrafield:countdown:')).length,
    caches: (await caches.keys()).filter((n) => n.startsWith('umbrafield-')).length,
  }))
  expect(await kept()).toEqual({ saved: 1, caches: 1 })
  await gotoHydrated(page, '/account')
  await page.getByRole('button', { name: 'Sign out', exact: true }).click()
  await expect(page.getByRole('banner').getByRole('link', { name: 'Sign in' })).toBeVisible()
  expect(await kept()).toEqual({ saved: 0, caches: 0 })
})
