import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs'
import { dirname, resolve } from 'node:path'

/**
 * The session secret (NUXT_SESSION_PASSWORD). In production it must be set: refuse to start.
 * In development and demo (NUXT_SEED=demo), generate one once and keep it in a git-ignored file.
 */
export default defineNitroPlugin(() => {
  if (process.env.NUXT_SESSION_PASSWORD && process.env.NUXT_SESSION_PASSWORD.length >= 32) return
  const demo = useRuntimeConfig().seed === 'demo'
  if (process.env.NODE_ENV === 'production' && !demo) {
    console.error('[umbrafield] NUXT_SESSION_PASSWORD is missing or shorter than 32 characters. Set it to a long random secret and start again.')
    process.exit(1)
  }
  const file = resolve(dirname(useRuntimeConfig().dbPath), '.session-secret')
  if (!existsSync(file)) {
    mkdirSync(dirname(file), { recursive: true })
    writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  }
  process.env.NUXT_SESSION_PASSWORD = readFileSync(file, 'utf8').trim()
})
