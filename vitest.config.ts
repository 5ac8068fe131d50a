import { defineConfig } from 'vitest/config'

export default defineConfig({
  test: {
    // A stray it.only would quietly narrow the run: refused outside CI too (scripts/test.mjs also passes --allowOnly=false).
    allowOnly: false,
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.spec.ts'],
          environment: 'node',
          testTimeout: 60_000,
        },
      },
      {
        test: {
          name: 'server',
          include: ['tests/server/**/*.spec.ts'],
          environment: 'node',
          testTimeout: 60_000,
          hookTimeout: 120_000,
          globalSetup: ['tests/server/global-setup.ts'],
          fileParallelism: false,
        },
      },
    ],
  },
})
