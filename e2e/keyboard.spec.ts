import type { Locator, Page } from '@playwright/test'
import { expect, gotoHydrated, hydrated, test } from './fixtures'

// Keyboard alone: Tab, Shift+Tab, Enter, Space and typing. No click, no mouse. At every stop the focused
// element must show where the focus is (a visible outline or ring), or a keyboard user is lost.

/** What the focused element is, and whether its focus can be seen: an outline or a box-shadow ring. */
async function focusState(page: Page) {
  return page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null
    if (!el || el === document.body) return { what: 'body', visible: true }
    const s = getComputedStyle(el)
    const transparent = (c: string) => c === 'transparent' || /rgba\(.*,\s*0\)$/.test(c)
    const outline = s.outlineStyle !== 'none' && parseFloat(s.outlineWidth) > 0 && !transparent(s.outlineColor)
    const ring = s.boxShadow !== 'none' && s.boxShadow !== ''
    // The browser itself must judge this a keyboard focus (:focus-visible), the state the app's ring is drawn for.
    if (!el.matches(':focus-visible')) return { what: `${el.tagName.toLowerCase()} (not :focus-visible)`, visible: false }
    const label = el.getAttribute('aria-label') ?? el.textContent?.trim().slice(0, 40) ?? ''
    return { what: `${el.tagName.toLowerCase()} "${label}"`, visible: outline || ring }
  })
}

async function expectFocusVisible(page: Page) {
  const f = await focusState(page)
  expect(f.visible, `no visible focus indicator on ${f.what}`).toBe(true)
}

/**
 * Presses Tab (or Shift+Tab) until the target has the focus, checking the focus ring at every stop.
 * Fails if the target is not reached in `max` presses: it is then not reachable by keyboard.
 */
async function tabTo(page: Page, target: Locator, { back, max = 150 }: { back?: boolean; max?: number } = {}) {
  // Unless told, go the short way: backwards when the target comes before the focus in the page.
  back ??= await target.evaluate((el) => {
    const at = document.activeElement
    return !!at && at !== document.body && !!(at.compareDocumentPosition(el) & Node.DOCUMENT_POSITION_PRECEDING)
  })
  for (let i = 0; i < max; i++) {
    await page.keyboard.press(back ? 'Shift+Tab' : 'Tab')
    await expectFocusVisible(page)
    if (await target.evaluate((el) => el === document.activeElement).catch(() => false)) return i + 1
  }
  throw new Error(`not reached by ${back ? 'Shift+Tab' : 'Tab'} in ${max} presses: ${target}`)
}

async function signInByKeyboard(page: Page, email: string) {
  await gotoHydrated(page, '/login')
  await tabTo(page, page.getByLabel('E-mail'))
  await page.keyboard.type(email)
  await tabTo(page, page.getByLabel('Password'))
  await page.keyboard.type('eclipse-demo')
  await page.keyboard.press('Enter')
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
  await hydrated(page)
}

test('a traveller books and pays a seat with the keyboard alone', async ({ page }) => {
  await signInByKeyboard(page, 'traveller@umbrafield.test')
  await gotoHydrated(page, '/trips')
  const tripLink = page.getByRole('link', { name: /Ring of sunlight over Punta del Este/ })
  await tabTo(page, tripLink)
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(/\/trips\/\d+$/)
  await hydrated(page)

  const seats = page.getByLabel('Seats')
  await tabTo(page, seats)
  await page.keyboard.press('Control+A')
  await page.keyboard.type('1')
  const hold = page.getByRole('button', { name: /Hold 1 seat/ })
  await tabTo(page, hold)
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(/\/bookings\/\d+$/)
  await hydrated(page)
  await expect(page.getByTestId('booking-status')).toHaveText('held')

  const pay = page.getByRole('button', { name: /Pay deposit/ })
  await tabTo(page, pay)
  await page.keyboard.press('Enter')

  // The local Stripe fake's checkout page (127.0.0.1, still this machine).
  await expect(page.getByText('TEST PAYMENT — local fake')).toBeVisible()
  await tabTo(page, page.getByLabel('Card number'))
  await page.keyboard.type('4242 4242 4242 4242')
  await tabTo(page, page.getByRole('button', { name: /^Pay/ }))
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(/\/bookings\/\d+\?paid=1/)
  await hydrated(page)
  await expect(page.getByTestId('booking-status')).toHaveText('confirmed', { timeout: 15_000 })

  // And back out to the booking list, still by keyboard (Shift+Tab up to the header).
  const myBookings = page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'My bookings' })
  await tabTo(page, myBookings)
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(/\/bookings$/)
  await expect(page.getByRole('table', { name: 'My bookings' })).toContainText('Punta del Este')
})

test('an organiser adds a candidate site and compares sites with the keyboard alone', async ({ page }) => {
  test.setTimeout(120_000)
  await signInByKeyboard(page, 'organiser@umbrafield.test')
  // A workspace of its own with two sites (set up through the API, not the page), so the demo workspace
  // stays as seeded for the other browser tests.
  const ws = (await (await page.request.post('/api/workspaces', { data: { eclipseId: '2027-08-02', name: 'Keyboard check (demo)' } })).json()) as { id: number }
  for (const site of [{ name: 'Nile bend (demo)', lat: 25.70, lon: 32.64 }, { name: 'Desert road (demo)', lat: 26.55, lon: 31.69 }]) {
    expect((await page.request.post(`/api/workspaces/${ws.id}/sites`, { data: site })).ok()).toBe(true)
  }
  await gotoHydrated(page, '/plan')
  await tabTo(page, page.getByRole('link', { name: /Keyboard check \(demo\)/ }))
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(new RegExp(`/plan/${ws.id}$`))
  await expect(page.getByRole('heading', { name: 'Keyboard check (demo)' })).toBeVisible()
  await hydrated(page)
  await expect(page.getByRole('button', { name: 'Site Nile bend (demo)' })).toBeVisible({ timeout: 30_000 })

  // Add a site by typing its coordinates (the keyboard way beside clicking the map).
  await tabTo(page, page.getByLabel('Latitude, longitude'))
  await page.keyboard.type('25.95, 32.75')
  await tabTo(page, page.getByLabel('Name (optional)'))
  await page.keyboard.type('Keyboard knoll')
  await page.keyboard.press('Enter')
  const table = page.getByRole('table', { name: 'Site comparison' })
  await expect(table.locator('tbody tr').filter({ hasText: 'Keyboard knoll' })).toHaveCount(1)
  await expect(page.getByRole('button', { name: 'Site Keyboard knoll' })).toBeAttached()

  // The table's box scrolls sideways from the keyboard.
  const scroller = page.getByRole('region', { name: 'Site comparison' })
  await tabTo(page, scroller)
  await page.keyboard.press('End')

  // Compare: sort by the central phase, then open two sites in turn from the site list.
  const sortButton = table.getByRole('button', { name: /Central phase/ })
  await tabTo(page, sortButton)
  const header = table.getByRole('columnheader', { name: /Central phase/ })
  const before = await header.getAttribute('aria-sort')
  await page.keyboard.press('Enter')
  await expect(header).not.toHaveAttribute('aria-sort', before ?? '')

  await tabTo(page, table.getByRole('button', { name: 'Keyboard knoll', exact: true }))
  await page.keyboard.press('Enter')
  await expect(page.getByRole('region', { name: 'Site Keyboard knoll' })).toBeVisible()
  await tabTo(page, table.getByRole('button', { name: 'Desert road (demo)', exact: true }))
  await page.keyboard.press('Space')
  await expect(page.getByRole('region', { name: 'Site Desert road (demo)' })).toBeVisible()
  await expect(table.getByRole('button', { name: 'Desert road (demo)', exact: true })).toHaveAttribute('aria-pressed', 'true')

  // The map's markers are buttons too: reachable and usable without the pointer.
  await tabTo(page, page.getByRole('button', { name: 'Site Keyboard knoll' }), { max: 250 })
  await page.keyboard.press('Enter')
  await expect(page.getByRole('region', { name: 'Site Keyboard knoll' })).toBeVisible()
})

test('on a phone the header menu opens, is walked and closes from the keyboard', async ({ page }) => {
  await page.setViewportSize({ width: 390, height: 844 })
  await signInByKeyboard(page, 'traveller@umbrafield.test')
  const menuButton = page.getByRole('button', { name: 'Menu' })
  await tabTo(page, menuButton)
  await page.keyboard.press('Enter')
  await expect(menuButton).toHaveAttribute('aria-expanded', 'true')
  const menu = page.locator(`#${await menuButton.getAttribute('aria-controls')}`)
  // The menu follows its button in the tab order.
  await page.keyboard.press('Tab')
  await expectFocusVisible(page)
  await expect(menu.getByRole('link').first()).toBeFocused()
  await tabTo(page, menu.getByRole('button', { name: 'Sign out', exact: true }), { max: 15 })
  await page.keyboard.press('Escape')
  await expect(menuButton).toHaveAttribute('aria-expanded', 'false')
  await expect(menuButton).toBeFocused()
  await expect(menu).toBeHidden()

  await page.keyboard.press('Space')
  await expect(menuButton).toHaveAttribute('aria-expanded', 'true')
  await tabTo(page, menu.getByRole('link', { name: 'Trips' }), { max: 15 })
  await page.keyboard.press('Enter')
  await expect(page).toHaveURL(/\/trips$/)
  await expect(menuButton).toHaveAttribute('aria-expanded', 'false')
})
