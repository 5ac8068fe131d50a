import { catalogue } from '../eclipse/catalogue'
import { isPostgres } from '../database/dialect'
import { INSTANCE_ID } from '../services/leases'
import { tile } from '../services/tiles'

/**
 * Ready when the database is migrated and the catalogue and basemap index are built (the first call
 * does the work). Says which database this instance uses and its instance name (for a proxy's checks).
 */
export default defineEventHandler(async () => {
  await dbReady()
  catalogue()
  tile(0, 0, 0)
  return { ok: true, database: isPostgres(useDb()) ? 'postgresql' : 'sqlite', instance: INSTANCE_ID }
})
