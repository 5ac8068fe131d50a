// npm run db:backup [-- FILE] — an online, consistent copy of the database; the app may keep running.
// SQLite (NUXT_DB_PATH, default data/umbrafield.sqlite): VACUUM INTO data/backups/umbrafield-<UTC time>.sqlite.
//   Restore: stop the app, copy the backup over the database file (and delete its -wal and -shm files), start again.
// PostgreSQL (DATABASE_URL=postgres://…): pg_dump in its custom format to data/backups/umbrafield-<UTC time>.dump.
//   Restore: pg_restore --clean --if-exists -d "$DATABASE_URL" FILE, with the app stopped.
import { backupDatabase, openDatabase } from '../server/database/connection'
import { isPostgresUrl } from '../server/database/dialect'
import { backupPostgres } from '../server/database/pgBackup'

const stamp = new Date().toISOString().replace(/[:.]/g, '-')
const url = process.env.DATABASE_URL
if (isPostgresUrl(url)) {
  try {
    console.log(`backed up the PostgreSQL database to ${backupPostgres(url, process.argv[2] || `data/backups/umbrafield-${stamp}.dump`)}`)
  } catch (e) {
    console.error((e as Error).message)
    process.exit(1)
  }
} else {
  const path = process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
  const target = process.argv[2] || `data/backups/umbrafield-${stamp}.sqlite`
  const db = openDatabase(path)
  try {
    console.log(`backed up ${path} to ${await backupDatabase(db, target)}`)
  } catch (e) {
    console.error((e as Error).message)
    process.exitCode = 1
  } finally {
    await db.destroy()
  }
}
