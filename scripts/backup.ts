// npm run db:backup [-- FILE] — an online, consistent copy of NUXT_DB_PATH (default data/umbrafield.sqlite),
// by default to data/backups/umbrafield-<UTC time>.sqlite. The app may keep running meanwhile.
// Restore: stop the app, copy the backup over the database file (and delete its -wal and -shm files), start again.
import { backupDatabase, openDatabase } from '../server/database/connection'

const path = process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
const target = process.argv[2] || `data/backups/umbrafield-${new Date().toISOString().replace(/[:.]/g, '-')}.sqlite`
const db = openDatabase(path)
try {
  console.log(`backed up ${path} to ${await backupDatabase(db, target)}`)
} catch (e) {
  console.error((e as Error).message)
  process.exitCode = 1
} finally {
  await db.destroy()
}
