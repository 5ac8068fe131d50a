import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { defineConfig } from '@playwright/test'

const PORT = Number(process.env.E2E_PORT ?? 3210)
const dataDir = mkdtempSync(join(tmpdir(), 'umbrafield-e2e-'))

export default defineConfig({
  testDir: 'e2e',
  timeout: 60_000,
  fullyParallel: false,
  workers: 1,
  reporter: [['list']],
  use: {
    baseURL: `http://localhost:${PORT}`,
    launchOptions: {
      executablePath: '/usr/bin/chromium',
      args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
    },
  },
  webServer: {
    command: 'node .output/server/index.mjs',
    url: `http://localhost:${PORT}/api/eclipses?from=2027&to=2027`,
    reuseExistingServer: false,
    timeout: 60_000,
    env: {
      PORT: String(PORT),
      NUXT_DB_PATH: join(dataDir, 'e2e.sqlite'),
      NUXT_SEED: 'demo',
      NUXT_SESSION_PASSWORD: 'e2e-session-password-that-is-long-enough-0123456789',
    },
  },
})
