// npm run db:migrate — runs pending migrations on NUXT_DB_PATH (default data/umbrafield.sqlite).
import { migrateToLatest, openDatabase } from '../server/database/connection'

const path = process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
const db = openDatabase(path)
try {
  const ran = await migrateToLatest(db)
  console.log(ran.length ? `migrated ${path}: ${ran.join(', ')}` : `${path} is up to date`)
} catch (e) {
  console.error((e as Error).message)
  process.exitCode = 1
} finally {
  await db.destroy()
}
