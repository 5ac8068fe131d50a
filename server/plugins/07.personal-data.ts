import { singleFlight, withLease } from '../services/leases'
import { purgeEndedTrips } from '../services/personalData/purge'

/**
 * Purges participants' details NUXT_PERSONAL_DATA_DAYS (default 90) after their trip ends: once an
 * hour (UMBRAFIELD_PURGE_MS; tests use the housekeeping tick), under a lease so one instance does it.
 */
export default defineNitroPlugin((nitro) => {
  const everyMs = Number(process.env.UMBRAFIELD_PURGE_MS || process.env.UMBRAFIELD_HOUSEKEEPING_MS || 3600_000)
  const tick = singleFlight(async () => {
    try {
      await dbReady()
      const db = useDb()
      await withLease(db, 'personal-data-purge', everyMs * 2, async () => { await purgeEndedTrips(db) })
    } catch (e) {
      console.error('[umbrafield] personal-data purge:', (e as Error).message)
    }
  })
  const timer = setInterval(tick, everyMs)
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
