import { spawnSync } from 'node:child_process'
import { mkdtempSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join, resolve } from 'node:path'
import { describe, expect, it } from 'vitest'
import { freePort } from '../../scripts/free-port.mjs'

describe('start-up', () => {
  it('refuses to start in production without NUXT_SESSION_PASSWORD, with a clear message', async () => {
    const env = { ...process.env, NODE_ENV: 'production', PORT: String(await freePort()), NUXT_DB_PATH: join(mkdtempSync(join(tmpdir(), 'uf-start-')), 'x.sqlite') } as Record<string, string>
    delete env.NUXT_SESSION_PASSWORD
    delete env.NUXT_SEED
    const r = spawnSync(process.execPath, [resolve(__dirname, '../../.output/server/index.mjs')], { env, encoding: 'utf8', timeout: 20_000 })
    expect(r.status).toBe(1)
    expect(r.stderr).toContain('NUXT_SESSION_PASSWORD is missing')
  })
})
