import type { Page } from '@playwright/test'
import { expect, gotoHydrated, signInAs, test } from './fixtures'

// Guides and travellers use Umbrafield on phones: at 390×844 no page may be wider than the screen.
// Wide tables scroll inside their own box; the header folds into a menu. Each page is also saved as a
// full-page screenshot under test-results/phone/ for a human look.
test.use({ viewport: { width: 390, height: 844 } })

/** The innermost elements that stick out past the right edge (outside any scrolling box), so a failure says what to fix. */
async function overflowing(page: Page) {
  return page.evaluate(() => {
    const vw = window.innerWidth
    const sticksOut = (el: Element) => {
      if (el.getBoundingClientRect().right <= vw + 0.5) return false
      // Inside a box that scrolls or clips, overflow is the point.
      for (let p = el.parentElement; p && p !== document.body; p = p.parentElement) if (getComputedStyle(p).overflowX !== 'visible') return false
      return true
    }
    const all = Array.from(document.body.querySelectorAll('*')).filter(sticksOut)
    return all.filter((el) => !all.some((o) => o !== el && el.contains(o)))
      .slice(0, 8).map((el) => `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 50)} "${el.textContent?.trim().slice(0, 30)}" → ${Math.round(el.getBoundingClientRect().right)}px`)
  })
}

async function fitsThePhone(page: Page, url: string, shot: string) {
  await gotoHydrated(page, url)
  // Let client-only parts (maps, charts) take their place before measuring.
  await page.waitForLoadState('networkidle')
  await page.screenshot({ path: `test-results/phone/${shot}.png`, fullPage: true })
  await page.screenshot({ path: `test-results/phone/${shot}-top.png` })
  const [scrollWidth, innerWidth] = await page.evaluate(() => [document.documentElement.scrollWidth, window.innerWidth])
  expect.soft(scrollWidth, `${url} is ${scrollWidth}px wide on a ${innerWidth}px screen: ${(await overflowing(page)).join('; ')}`).toBeLessThanOrEqual(innerWidth)
}

async function menuShowsSignOut(page: Page) {
  const menuButton = page.getByRole('button', { name: 'Menu' })
  await expect(menuButton).toBeVisible()
  await expect(menuButton).toHaveAttribute('aria-expanded', 'false')
  await expect(page.getByRole('button', { name: 'Sign out', exact: true })).toBeHidden()
  await menuButton.click()
  await expect(menuButton).toHaveAttribute('aria-expanded', 'true')
  const menu = page.locator(`#${await menuButton.getAttribute('aria-controls')}`)
  await expect(menu.getByRole('button', { name: 'Sign out', exact: true })).toBeVisible()
  await expect(menu.getByRole('button', { name: 'Sign out', exact: true })).toBeInViewport({ ratio: 1 })
  await page.screenshot({ path: `test-results/phone/menu-open-${test.info().title.split(' ')[0]}.png` })
  await page.keyboard.press('Escape')
  await expect(menuButton).toHaveAttribute('aria-expanded', 'false')
  await expect(menuButton).toBeFocused()
}

test('anonymous pages fit a phone', async ({ page }) => {
  for (const [url, shot] of [
    ['/', 'home'], ['/trips', 'trips'], ['/trips/1', 'trip'], ['/eclipses', 'eclipses'], ['/eclipses/2027-08-02', 'eclipse'],
    ['/login', 'sign-in'], ['/register', 'sign-up'], ['/forgot-password', 'forgot-password'], ['/reset-password?token=x', 'reset-password'],
  ] as const) await fitsThePhone(page, url, `anon-${shot}`)
  const menuButton = page.getByRole('button', { name: 'Menu' })
  await menuButton.click()
  const menu = page.locator(`#${await menuButton.getAttribute('aria-controls')}`)
  await expect(menu.getByRole('link', { name: 'Sign in' })).toBeInViewport({ ratio: 1 })
  // Following a link closes the menu.
  await menu.getByRole('link', { name: 'Trips' }).click()
  await expect(page).toHaveURL(/\/trips$/)
  await expect(menuButton).toHaveAttribute('aria-expanded', 'false')
})

test('traveller pages fit a phone', async ({ page }) => {
  await signInAs(page, 'traveller2@umbrafield.test')
  const bookings = (await (await page.request.get('/api/bookings')).json()) as { data: Array<{ id: number }> }
  expect(bookings.data.length).toBeGreaterThan(0)
  for (const [url, shot] of [
    ['/bookings', 'bookings'], [`/bookings/${bookings.data[0]!.id}`, 'booking'], ['/trips/1', 'trip'], ['/trips/1/briefing', 'briefing'], ['/account', 'account'],
  ] as const) await fitsThePhone(page, url, `traveller-${shot}`)
  // On the trip page the booking box comes before the long safety block; the safety text stays.
  await gotoHydrated(page, '/trips/1')
  const seats = await page.getByRole('button', { name: /Hold \d+ seat/ }).boundingBox()
  const safety = await page.getByRole('note', { name: 'Eye safety' }).first().boundingBox()
  expect(seats && safety && seats.y < safety.y, 'booking box above the safety block').toBe(true)
  await expect(page.getByRole('note', { name: 'Eye safety' }).first()).toContainText('ISO 12312-2')
  await menuShowsSignOut(page)
})

test('guide pages fit a phone', async ({ page }) => {
  await signInAs(page, 'guide@umbrafield.test')
  for (const [url, shot] of [
    ['/guide/trips', 'my-trips'], ['/trips/1/timetable', 'timetable'], ['/trips/1/countdown/4', 'countdown'], ['/trips/1/manifest', 'manifest'], ['/bookings', 'bookings'],
  ] as const) await fitsThePhone(page, url, `guide-${shot}`)
  // The countdown shows days at this date: every digit stays on the screen.
  await gotoHydrated(page, '/trips/1/countdown/4')
  const digits = page.getByTestId('countdown-value')
  await expect(digits).toContainText(/\d+\s*d/)
  const box = (await digits.boundingBox())!
  expect(box.x).toBeGreaterThanOrEqual(0)
  expect(box.x + box.width).toBeLessThanOrEqual(390)
  expect(await digits.evaluate((el) => el.scrollWidth <= el.clientWidth)).toBe(true)
  // The countdown has a bare layout of its own; the menu lives on the other pages.
  await gotoHydrated(page, '/trips/1/timetable')
  await menuShowsSignOut(page)
})

test('organiser pages fit a phone', async ({ page }) => {
  test.setTimeout(240_000)
  await signInAs(page, 'organiser@umbrafield.test')
  // The voyage goes in a workspace of its own, so the demo workspace stays as seeded for the other browser tests.
  const ws = (await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'Phone check (demo)' } })).json()) as { id: number }
  const voyage = await page.request.post(`/api/workspaces/${ws.id}/voyages`, {
    data: { name: 'Phone check voyage (demo)', departure: { lat: 36.7, lon: -4.4, utc: '2027-08-01T20:00:00Z' }, speedKn: 16, minSunAltitudeDeg: 10 },
    timeout: 120_000,
  })
  expect(voyage.ok(), await voyage.text()).toBe(true)
  const { id: voyageId } = (await voyage.json()) as { id: number }
  for (const [url, shot] of [
    ['/plan', 'planning'], ['/plan/1', 'workspace'], ['/trips', 'trips'], ['/trips/new', 'trip-new'], ['/trips/1/manage', 'trip-manage'], ['/trips/1/edit', 'trip-edit'],
    ['/people', 'people'], ['/alerts', 'alerts'], ['/outbox', 'outbox'], ['/reconciliation', 'reconciliation'], ['/eclipses', 'eclipses'],
    ['/eclipses/2027-08-02', 'eclipse'], ['/trips/1/decision', 'decision'], ['/trips/1/outlook', 'outlook'], [`/voyages/${voyageId}`, 'voyage'], ['/account', 'account'],
  ] as const) await fitsThePhone(page, url, `organiser-${shot}`)
  await menuShowsSignOut(page)
})

test('the wide-screen header keeps its links in the bar, with no menu button', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 })
  await signInAs(page, 'organiser@umbrafield.test')
  await expect(page.getByRole('button', { name: 'Menu' })).toBeHidden()
  await expect(page.getByRole('button', { name: 'Sign out', exact: true })).toBeVisible()
  await expect(page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'People' })).toBeVisible()
  // The trip page keeps its two columns: the booking box beside the text, the safety block in the left column.
  await gotoHydrated(page, '/trips/1')
  await page.screenshot({ path: 'test-results/phone/desktop-trip.png', fullPage: true })
  const price = (await page.getByText('per seat').first().boundingBox())!
  const safety = (await page.getByRole('note', { name: 'Eye safety' }).first().boundingBox())!
  expect(price.x).toBeGreaterThan(safety.x + safety.width)
})
