// npm run db:migrate — runs pending migrations on DATABASE_URL (postgres://…) when set, otherwise on
// the SQLite file NUXT_DB_PATH (default data/umbrafield.sqlite). Safe to run from several places at
// once: each migration is applied once.
import { migrateToLatest, openDatabase } from '../server/database/connection'
import { isPostgresUrl } from '../server/database/dialect'

const target = isPostgresUrl(process.env.DATABASE_URL) ? process.env.DATABASE_URL : process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
const shown = isPostgresUrl(target) ? target.replace(/\/\/[^@/]*@/, '//') : target
const db = openDatabase(target)
try {
  const ran = await migrateToLatest(db)
  console.log(ran.length ? `migrated ${shown}: ${ran.join(', ')}` : `${shown} is up to date`)
} catch (e) {
  console.error((e as Error).message)
  process.exitCode = 1
} finally {
  await db.destroy()
}
