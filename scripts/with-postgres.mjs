// Runs a command with a throwaway PostgreSQL cluster: UMBRAFIELD_TEST_PG_URL names it. The cluster
// is removed afterwards; the exit code is the command's. A cluster that does not start fails the run.
import { spawnSync } from 'node:child_process'
import { startPostgres } from './pg-cluster.mjs'

const [cmd, ...args] = process.argv.slice(2)
if (!cmd) { console.error('usage: node scripts/with-postgres.mjs <command> [args…]'); process.exit(2) }
let pg
try {
  pg = await startPostgres()
} catch (e) {
  console.error(`✗ ${e.message}`)
  process.exit(1)
}
console.log(`▶ PostgreSQL up at ${pg.url}`)
const stop = () => pg.stop()
process.on('SIGINT', () => { stop(); process.exit(130) })
process.on('SIGTERM', () => { stop(); process.exit(143) })
const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, UMBRAFIELD_TEST_PG_URL: pg.url } })
stop()
process.exit(r.status ?? 1)
