import type { Kysely } from 'kysely'
import { migrateToLatest, openDatabase } from '../database/connection'
import { isPostgresUrl } from '../database/dialect'
import type { Database } from '../database/schema'
import { seedDemo } from '../database/seed/demo'

let instance: Kysely<Database> | undefined
let ready: Promise<void> | undefined

/**
 * The one Kysely instance of this server process: PostgreSQL when DATABASE_URL is a postgres:// URL,
 * otherwise the embedded SQLite file at runtimeConfig.dbPath (NUXT_DB_PATH).
 */
export function useDb(): Kysely<Database> {
  if (!instance) instance = openDatabase(isPostgresUrl(process.env.DATABASE_URL) ? process.env.DATABASE_URL : useRuntimeConfig().dbPath)
  return instance
}

/**
 * The demo's accounts share a published password: seeding them is refused unless the app's public
 * URL is local and this is not a production build, or the operator says so explicitly
 * (UMBRAFIELD_ALLOW_DEMO_SEED=1; the older NUXT_ALLOW_DEMO_SEED=yes still counts).
 */
export function assertDemoSeedAllowed(appUrl: string, nodeEnv = process.env.NODE_ENV) {
  const allowed = process.env.UMBRAFIELD_ALLOW_DEMO_SEED === '1' || process.env.NUXT_ALLOW_DEMO_SEED === 'yes'
  if (allowed) return
  // A production build (the built app always is one) seeds the demo only when told to, even on a
  // local address: a production server behind a proxy also sees itself as localhost.
  if (nodeEnv === 'production') {
    throw new Error('refusing to seed demo data (published passwords) in production (NODE_ENV=production). Set UMBRAFIELD_ALLOW_DEMO_SEED=1 to do it anyway, e.g. for the local demo or tests.')
  }
  const local = /^https?:\/\/(localhost|127\.0\.0\.1|\[::1\])(:\d+)?(\/|$)/.test(appUrl)
  if (!local) {
    throw new Error(`refusing to seed demo data (published passwords) for ${appUrl}: it is not a local address. Set UMBRAFIELD_ALLOW_DEMO_SEED=1 to do it anyway.`)
  }
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
      if (useRuntimeConfig().seed === 'demo') {
        assertDemoSeedAllowed(useRuntimeConfig().public.appUrl)
        await seedDemo(db)
      }
    })()
    ready.catch((e) => {
      console.error('[umbrafield] database start-up failed:', (e as Error).message)
      process.exit(1)
    })
  }
  return ready
}
