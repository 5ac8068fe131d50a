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
    const outline = s.outlineStyle !== 'none' && parseFloat(s.outlineWidth) > 0
    const ring = s.boxShadow !== 'none' && s.boxShadow !== ''
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
  await gotoHydrated(page, '/plan')
  await tabTo(page, page.getByRole('link', { name: /Strait of Gibraltar/ }))
  await page.keyboard.press('Enter')
  await expect(page.getByRole('heading', { name: /Strait of Gibraltar/ })).toBeVisible()
  await hydrated(page)
  await expect(page.getByRole('button', { name: 'Site Luxor West Bank' })).toBeVisible({ timeout: 30_000 })

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
  await tabTo(page, table.getByRole('button', { name: 'Sohag farmland', exact: true }))
  await page.keyboard.press('Space')
  await expect(page.getByRole('region', { name: 'Site Sohag farmland' })).toBeVisible()
  await expect(page.getByRole('region', { name: 'Site Sohag farmland' }).getByText('If the sky fails here, fall back to')).toBeVisible()

  // The map's markers are buttons too: reachable and usable without the pointer.
  await tabTo(page, page.getByRole('button', { name: 'Site Keyboard knoll' }), { max: 250 })
  await page.keyboard.press('Enter')
  await expect(page.getByRole('region', { name: 'Site Keyboard knoll' })).toBeVisible()
})
