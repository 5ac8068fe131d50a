// npm test — everything: build, lint, types, unit + server tests (vitest) on SQLite, the server tests
// again on a throwaway PostgreSQL 15 cluster, browser tests (Playwright in Debian Chromium).
// Installs Chromium and PostgreSQL with apt when they are missing and we are root (a PostgreSQL that
// cannot be installed or started fails the run). Never downloads a browser of its own.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'

const CHROMIUM = '/usr/bin/chromium'
const tmp = mkdtempSync(join(tmpdir(), 'umbrafield-tests-'))

function run(label, cmd, args, env = {}) {
  console.log(`\n▶ ${label}: ${cmd} ${args.join(' ')}`)
  const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } })
  if (r.status !== 0) {
    console.error(`\n✗ ${label} failed (exit ${r.status ?? r.signal})`)
    process.exit(r.status || 1)
  }
}

if (!existsSync(CHROMIUM)) {
  if (process.getuid && process.getuid() === 0) {
    run('install Chromium', 'bash', ['-c', 'apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium'])
  } else {
    console.error(`✗ ${CHROMIUM} is missing. Install Debian's chromium (apt-get install -y chromium) or run npm test as root.`)
    process.exit(1)
  }
}

run('build', 'npx', ['nuxt', 'build'])
run('lint', 'npm', ['run', '--silent', 'lint'])
run('types', 'npx', ['vue-tsc', '-b', '--noEmit'])
const vitestJson = join(tmp, 'vitest.json')
run('unit and server tests (SQLite)', 'npx', ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${vitestJson}`])
const pgJson = join(tmp, 'vitest-postgres.json')
run('server tests (PostgreSQL)', process.execPath, ['scripts/with-postgres.mjs', 'npx', 'vitest', 'run', '--project', 'server', '--reporter=default', '--reporter=json', `--outputFile.json=${pgJson}`])
const pwJson = join(tmp, 'playwright.json')
run('browser tests', 'npx', ['playwright', 'test', '--reporter=list,json'], { PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson })

const v = JSON.parse(readFileSync(vitestJson, 'utf8'))
const g = JSON.parse(readFileSync(pgJson, 'utf8'))
const p = JSON.parse(readFileSync(pwJson, 'utf8'))
const passed = v.numPassedTests + g.numPassedTests + (p.stats?.expected ?? 0)
const failed = v.numFailedTests + g.numFailedTests + (p.stats?.unexpected ?? 0)
const skipped = (v.numPendingTests ?? 0) + (g.numPendingTests ?? 0) + (p.stats?.skipped ?? 0)
console.log(`\nunit+server on SQLite: ${v.numPassedTests} passed; server on PostgreSQL: ${g.numPassedTests} passed; browser: ${p.stats?.expected ?? 0} passed`)
console.log(`${passed} passed, ${failed} failed, ${skipped} skipped`)
// A skipped test fails the run too: nothing may be quietly left out.
if (skipped > 0) console.error(`✗ ${skipped} test(s) skipped`)
process.exit(failed > 0 || passed === 0 || skipped > 0 ? 1 : 0)
