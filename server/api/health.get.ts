import { catalogue } from '../eclipse/catalogue'
import { tile } from '../services/tiles'

/** Ready when the database is migrated and the catalogue and basemap index are built (the first call does the work). */
export default defineEventHandler(async () => {
  await dbReady()
  catalogue()
  tile(0, 0, 0)
  return { ok: true }
})
