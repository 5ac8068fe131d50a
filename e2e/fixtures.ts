import { test as base, expect, type Page } from '@playwright/test'
import { E2E_NOW } from './clock'

/** Every test fails if the page asks for anything that is not on this machine. */
export const test = base.extend<{ outside: string[]; fixedClock: undefined; cspViolations: string[] }>({
  /** Every page runs on the fixed test date (e2e/clock.ts); time still flows from there. */
  fixedClock: [async ({ page }, use) => {
    await page.clock.install({ time: E2E_NOW })
    await use(undefined)
  }, { auto: true }],
  outside: [async ({ context }, use) => {
    const outside: string[] = []
    context.on('request', (req) => {
      const u = new URL(req.url())
      if (u.protocol === 'data:' || u.protocol === 'blob:') return
      if (!['localhost', '127.0.0.1', '[::1]'].includes(u.hostname)) outside.push(req.url())
    })
    await use(outside)
    expect(outside, 'requests that left the machine').toEqual([])
  }, { auto: true }],
  /** Every test fails if a page breaks its Content Security Policy (a script without the nonce, a blocked worker). */
  cspViolations: [async ({ page }, use) => {
    const seen: string[] = []
    page.on('console', (m) => { if (m.type() === 'error' && /Content Security Policy/i.test(m.text())) seen.push(m.text()) })
    await use(seen)
    expect(seen, 'Content Security Policy violations').toEqual([])
  }, { auto: true }],
})
export { expect }

/**
 * Waits until the page is hydrated (app.vue and error.vue mark <html data-hydrated> once mounted):
 * before that, a click or a change to a control can be lost, most of all on a busy machine.
 */
export async function hydrated(page: Page) {
  await expect(page.locator('html')).toHaveAttribute('data-hydrated', 'true', { timeout: 30_000 })
}

/**
 * Opens a page of the app and waits for hydration, so the test acts on live controls. Every test
 * opens app pages this way; after a full reload, call `hydrated` again. Returns the response.
 */
export async function gotoHydrated(page: Page, url: string) {
  const res = await page.goto(url)
  await hydrated(page)
  return res
}

export async function signInAs(page: Page, email: string, password = 'eclipse-demo') {
  await gotoHydrated(page, '/login')
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
  await hydrated(page)
}
