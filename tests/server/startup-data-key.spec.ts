import { spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { freePort } from '../../scripts/free-port.mjs'

const server = resolve(__dirname, '../../.output/server/index.mjs')

/** Starts the built app in production with `env` on a throwaway database; the process is expected to exit. */
async function start(env: Record<string, string | undefined>) {
  const merged: Record<string, string | undefined> = { ...process.env, NODE_ENV: 'production', PORT: String(await freePort()), NUXT_DB_PATH: join(mkdtempSync(join(tmpdir(), 'uf-start-')), 'x.sqlite'),
    NUXT_SESSION_PASSWORD: 'a-session-password-that-is-long-enough-0123456789', ...env, NUXT_SEED: undefined }
  // Unset (undefined) variables are left out, not passed as empty.
  const full = Object.fromEntries(Object.entries(merged).filter((e): e is [string, string] => e[1] !== undefined))
  return spawnSync(process.execPath, [server], { env: full, encoding: 'utf8', timeout: 20_000 })
}

describe('start-up without a data key', () => {
  it('refuses to start in production without NUXT_DATA_KEY, saying how to make one', async () => {
    const r = await start({ NUXT_DATA_KEY: undefined })
    expect(r.status).toBe(1)
    expect(r.stderr).toContain('NUXT_DATA_KEY is missing')
    expect(r.stderr).toMatch(/32 random bytes/)
  })

  it('refuses a data key that is not 32 bytes, before serving anything', async () => {
    const r = await start({ NUXT_DATA_KEY: randomBytes(16).toString('base64') })
    expect(r.status).toBe(1)
    expect(r.stderr).toMatch(/NUXT_DATA_KEY must be 32 bytes/)
  })
})
