import { chmodSync, mkdirSync, readdirSync, rmSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'
import { backupDatabase } from '../database/connection'
import { isPostgresUrl } from '../database/dialect'
import { nowIso } from '../services/clock'

/**
 * A rolling nightly backup: an online copy (VACUUM INTO) once a day into data/backups/ beside the
 * database (NUXT_BACKUP_DIR to change it), keeping the newest seven (NUXT_BACKUP_KEEP).
 * Files are 0600 in a 0700 folder, and data/backups/ is git-ignored.
 * NUXT_BACKUPS=off turns it off (e.g. when the host backs up the volume itself).
 */
const DAY_MS = 24 * 3600_000
export default defineNitroPlugin((nitro) => {
  if (process.env.NUXT_BACKUPS === 'off') return
  // PostgreSQL is backed up by its operator (pg_dump, or the managed service's snapshots).
  if (isPostgresUrl(process.env.DATABASE_URL)) return
  const dir = resolve(process.env.NUXT_BACKUP_DIR || join(dirname(resolve(useRuntimeConfig().dbPath)), 'backups'))
  const keep = Number(process.env.NUXT_BACKUP_KEEP || 7)
  const run = async () => {
    try {
      await dbReady()
      // The backup folder is the owner's alone, also when an older version made it world-readable
      // (a folder named by NUXT_BACKUP_DIR is the operator's to set).
      mkdirSync(dir, { recursive: true, mode: 0o700 })
      if (!process.env.NUXT_BACKUP_DIR) chmodSync(dir, 0o700)
      const today = nowIso().slice(0, 10)
      const existing = (() => { try { return readdirSync(dir).filter((f) => /^umbrafield-.*\.sqlite$/.test(f)).sort() } catch { return [] } })()
      if (!existing.some((f) => f.startsWith(`umbrafield-${today}`))) {
        await backupDatabase(useDb(), join(dir, `umbrafield-${nowIso().replace(/[:.]/g, '-')}.sqlite`))
      }
      const all = readdirSync(dir).filter((f) => /^umbrafield-.*\.sqlite$/.test(f)).sort()
      for (const f of all.slice(0, Math.max(0, all.length - keep))) rmSync(join(dir, f), { force: true })
    } catch (e) {
      console.error('[umbrafield] nightly backup:', (e as Error).message)
    }
  }
  void run()
  const timer = setInterval(run, Number(process.env.NUXT_BACKUP_EVERY_MS || DAY_MS))
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
