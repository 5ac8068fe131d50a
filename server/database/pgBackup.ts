import { spawnSync } from 'node:child_process'
import { chmodSync } from 'node:fs'
import { privateBackupFile } from './connection'

/**
 * pg_dump (custom format) of the PostgreSQL database at `url` into `file`, mode 0600 in a 0700 folder
 * like the SQLite backups, whatever the umask. `pgDump` is the program to run (tests pass a stand-in).
 */
export function backupPostgres(url: string, file: string, pgDump = 'pg_dump'): string {
  const target = privateBackupFile(file)
  const r = spawnSync(pgDump, ['--format=custom', `--file=${target}`, url], { stdio: 'inherit' })
  if (r.status !== 0) throw new Error(`pg_dump failed (${r.error?.message ?? `exit ${r.status}`})`)
  chmodSync(target, 0o600)
  return target
}
