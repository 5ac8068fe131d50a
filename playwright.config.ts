import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { defineConfig } from '@playwright/test'
import { fakeServices } from './scripts/fakes.mjs'
import { freePortSync } from './scripts/free-port.mjs'
import { E2E_DATE } from './e2e/clock'

// Free ports, picked once in the main process and inherited by the workers through the environment,
// so two suites (or a suite beside the demo) never collide.
process.env.E2E_PORT ??= String(freePortSync())
const PORT = Number(process.env.E2E_PORT)
const dataDir = mkdtempSync(join(tmpdir(), 'umbrafield-e2e-'))
process.env.STRIPE_FAKE_PORT ??= String(freePortSync())
process.env.MAIL_FAKE_SMTP_PORT ??= String(freePortSync())
process.env.MAIL_FAKE_WEB_PORT ??= String(freePortSync())
process.env.FORECAST_FAKE_PORT ??= String(freePortSync())
process.env.SMS_FAKE_PORT ??= String(freePortSync())
const fakes = fakeServices({ appPort: PORT })

export default defineConfig({
  testDir: 'e2e',
  timeout: 60_000,
  // Two cores shared with builds and other suites: a page can take longer than the default 5 s to settle.
  expect: { timeout: 10_000 },
  fullyParallel: false,
  // A stray test.only would quietly run one test and pass: refused everywhere, not only in CI.
  forbidOnly: true,
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
      UMBRAFIELD_ALLOW_DEMO_SEED: '1',
      NUXT_SESSION_PASSWORD: 'e2e-session-password-that-is-long-enough-0123456789',
      NUXT_PUBLIC_APP_URL: `http://localhost:${PORT}`,
      // Date-dependent tests (the refund tier) run on a fixed date; the browser clock is fixed per test.
      UMBRAFIELD_FIXED_DATE: E2E_DATE,
      ...Object.assign({}, ...fakes.map((f) => f.appEnv)),
    },
  }],
})
