import type { Kysely } from 'kysely'
import { migrateToLatest, openDatabase } from '../database/connection'
import type { Database } from '../database/schema'
import { seedDemo } from '../database/seed/demo'

let instance: Kysely<Database> | undefined
let ready: Promise<void> | undefined

/** The one Kysely instance of this server process. The path comes from runtimeConfig.dbPath (NUXT_DB_PATH). */
export function useDb(): Kysely<Database> {
  if (!instance) instance = openDatabase(useRuntimeConfig().dbPath)
  return instance
}

/**
 * Resolves once migrations (and the demo seed, when NUXT_SEED=demo) have run. Started by a
 * Nitro plugin at boot and awaited by the first middleware, because Nitro does not await
 * async plugins before serving.
 */
export function dbReady(): Promise<void> {
  if (!ready) {
    ready = (async () => {
      const db = useDb()
      await migrateToLatest(db)
      if (useRuntimeConfig().seed === 'demo') await seedDemo(db)
    })()
    ready.catch((e) => {
      console.error('[umbrafield] database start-up failed:', (e as Error).message)
      process.exit(1)
    })
  }
  return ready
}
