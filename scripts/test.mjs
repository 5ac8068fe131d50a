// npm test — everything: build, lint, types, unit + server tests (vitest) on SQLite, the server tests
// again on a throwaway PostgreSQL 15 cluster, browser tests (Playwright in Debian Chromium).
// Installs Chromium and PostgreSQL with apt when they are missing and we are root (a PostgreSQL that
// cannot be installed or started fails the run). Never downloads a browser of its own.
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { countPlaywright, countVitest } from './test-results.mjs'

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
run('unit and server tests (SQLite)', 'npx', ['vitest', 'run', '--allowOnly=false', '--reporter=default', '--reporter=json', `--outputFile.json=${vitestJson}`])
const pgJson = join(tmp, 'vitest-postgres.json')
run('server tests (PostgreSQL)', process.execPath, ['scripts/with-postgres.mjs', 'npx', 'vitest', 'run', '--allowOnly=false', '--project', 'server', '--reporter=default', '--reporter=json', `--outputFile.json=${pgJson}`])
const pwJson = join(tmp, 'playwright.json')
run('browser tests', 'npx', ['playwright', 'test', '--reporter=list,json'], { PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson })

// Counted per test, so todo tests count as not run like skipped ones (scripts/test-results.mjs).
const v = countVitest(JSON.parse(readFileSync(vitestJson, 'utf8')))
const g = countVitest(JSON.parse(readFileSync(pgJson, 'utf8')))
const p = countPlaywright(JSON.parse(readFileSync(pwJson, 'utf8')))
const passed = v.passed + g.passed + p.passed
const failed = v.failed + g.failed + p.failed
const notRun = v.notRun + g.notRun + p.notRun
console.log(`\nunit+server on SQLite: ${v.passed} passed; server on PostgreSQL: ${g.passed} passed; browser: ${p.passed} passed`)
console.log(`${passed} passed, ${failed} failed, ${notRun} not run (skipped or todo; ${v.todo + g.todo} todo)`)
// A skipped or todo test fails the run too: nothing may be quietly left out. A `.only` fails it
// as well (vitest --allowOnly=false, Playwright forbidOnly), in CI and out of it.
if (notRun > 0) console.error(`✗ ${notRun} test(s) not run`)
process.exit(failed > 0 || passed === 0 || notRun > 0 ? 1 : 0)
