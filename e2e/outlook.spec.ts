import { spawn, type ChildProcess } from 'node:child_process'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { fakeServices } from '../scripts/fakes.mjs'
import { freePort } from '../scripts/free-port.mjs'
import { expect, gotoHydrated, hydrated, test } from './fixtures'

// The outlook opens only in the eclipse week, while the shared browser-test app lives months before
// it (e2e/clock.ts). So this file starts its own instance of the built app, on the business date
// 2027-07-29 (four days before the demo's Luxor eclipse), against the suite's forecast fake.
let app: ChildProcess | null = null
let base = ''
const fake = () => `http://127.0.0.1:${process.env.FORECAST_FAKE_PORT}`

test.beforeAll(async () => {
  test.setTimeout(180_000)
  const port = await freePort()
  base = `http://localhost:${port}`
  const dir = mkdtempSync(join(tmpdir(), 'umbrafield-e2e-outlook-'))
  app = spawn(process.execPath, ['.output/server/index.mjs'], {
    stdio: 'ignore',
    env: {
      // Only the forecast fake: no mail or payments from this instance reach the suite's catcher and Stripe fake.
      ...process.env, ...fakeServices({ appPort: port }).find((f) => f.name === 'forecast-fake')!.appEnv,
      PORT: String(port), NUXT_DB_PATH: join(dir, 'outlook.sqlite'), NUXT_SEED: 'demo', UMBRAFIELD_ALLOW_DEMO_SEED: '1',
      NUXT_SESSION_PASSWORD: 'e2e-outlook-session-password-long-enough-0123456789', NUXT_PUBLIC_APP_URL: base,
      UMBRAFIELD_FIXED_DATE: '2027-07-29',
    },
  })
  for (let i = 0; i < 600; i++) {
    try { if ((await fetch(`${base}/api/health`)).ok) return } catch { /* starting */ }
    await new Promise((r) => setTimeout(r, 250))
  }
  throw new Error('the outlook test app did not start')
})
test.afterAll(async () => {
  if (app?.pid) process.kill(app.pid, 'SIGTERM')
  await fetch(`${fake()}/_fake/forecast/reset`, { method: 'POST' })
})

test('the organiser opens the outlook from the trip, fetches a forecast and reads the ranked table', async ({ page }) => {
  const trips = await (await fetch(`${base}/api/trips`)).json() as { data: Array<{ id: number; title: string }> }
  const trip = trips.data.find((t) => /^Luxor totality week/.test(t.title))!
  await gotoHydrated(page, `${base}/login`)
  await page.getByLabel('E-mail').fill('organiser@umbrafield.test')
  await page.getByLabel('Password').fill('eclipse-demo')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.waitForURL((u) => !u.pathname.startsWith('/login'))
  await hydrated(page)
  await gotoHydrated(page, `${base}/trips/${trip.id}/manage`)
  await page.getByRole('link', { name: 'Forecast outlook' }).click()
  await page.waitForURL(/\/outlook$/)
  await hydrated(page)
  // Clear at the Qena fallback, thick cloud everywhere else; then fetch now.
  await fetch(`${fake()}/_fake/forecast/set`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ default: 95, points: [{ lat: 26.1551, lon: 32.716, cloudCoverPct: 0 }] }) })
  await page.getByRole('button', { name: 'Fetch forecast now' }).click()
  await expect(page.getByRole('status').filter({ hasText: 'A new forecast run was fetched.' })).toBeVisible()
  const table = page.getByRole('table', { name: 'Ranked sites' })
  const rows = table.getByRole('row')
  await expect(rows).toHaveCount(4) // the header, the primary and two fallbacks
  await expect(rows.nth(1).getByRole('rowheader')).toContainText('Qena plateau')
  await expect(rows.nth(1).getByRole('cell').nth(1)).toHaveText('0')
  await expect(table.getByRole('row', { name: /Luxor West Bank/ }).getByRole('cell').nth(1)).toHaveText('95')
  await expect(page.getByRole('region', { name: 'Recommendation' })).toContainText('Qena plateau')
  // Each site's chart of runs has its text alternative and its data table.
  await expect(page.getByRole('img', { name: /forecast runs? for Qena plateau/ })).toBeVisible()
  await page.getByRole('button', { name: /^Show as a table/ }).first().click()
  await expect(page.getByRole('table', { name: /^Forecast runs, / }).first()).toBeVisible()
})
