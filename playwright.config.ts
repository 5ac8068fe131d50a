import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { defineConfig } from '@playwright/test'
import { fakeServices } from './scripts/fakes.mjs'
import { E2E_DATE } from './e2e/clock'

const PORT = Number(process.env.E2E_PORT ?? 3210)
const dataDir = mkdtempSync(join(tmpdir(), 'umbrafield-e2e-'))
// The browser tests get their own fake ports, so a running demo does not collide with them.
process.env.STRIPE_FAKE_PORT ??= '12113'
process.env.MAIL_FAKE_SMTP_PORT ??= '12025'
process.env.MAIL_FAKE_WEB_PORT ??= '12080'
const fakes = fakeServices({ appPort: PORT })

export default defineConfig({
  testDir: 'e2e',
  timeout: 60_000,
  fullyParallel: false,
  forbidOnly: !!process.env.CI,
  workers: 1,
  reporter: [['list']],
  use: {
    baseURL: `http://localhost:${PORT}`,
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    },
  },
  webServer: [...fakes.map((f) => ({
    command: `node ${f.args.join(' ')}`,
    url: f.health,
    reuseExistingServer: false,
    timeout: 30_000,
    env: f.env,
  })), {
    command: 'node .output/server/index.mjs',
    url: `http://localhost:${PORT}/api/health`,
    reuseExistingServer: false,
    timeout: 60_000,
    env: {
      PORT: String(PORT),
      NUXT_DB_PATH: join(dataDir, 'e2e.sqlite'),
      NUXT_SEED: 'demo',
      NUXT_SESSION_PASSWORD: 'e2e-session-password-that-is-long-enough-0123456789',
      NUXT_PUBLIC_APP_URL: `http://localhost:${PORT}`,
      // Date-dependent tests (the refund tier) run on a fixed date; the browser clock is fixed per test.
      UMBRAFIELD_FIXED_DATE: E2E_DATE,
      ...Object.assign({}, ...fakes.map((f) => f.appEnv)),
    },
  }],
})
