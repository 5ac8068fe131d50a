// npm test — everything: build, lint, types, unit + server tests (vitest), browser tests (Playwright in Debian Chromium).
// Installs Chromium with apt when it is missing and we are root. Never downloads a browser of its own.
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
run('unit and server tests', 'npx', ['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${vitestJson}`])
const pwJson = join(tmp, 'playwright.json')
run('browser tests', 'npx', ['playwright', 'test', '--reporter=list,json'], { PLAYWRIGHT_JSON_OUTPUT_NAME: pwJson })

const v = JSON.parse(readFileSync(vitestJson, 'utf8'))
const p = JSON.parse(readFileSync(pwJson, 'utf8'))
const passed = v.numPassedTests + (p.stats?.expected ?? 0)
const failed = v.numFailedTests + (p.stats?.unexpected ?? 0)
const skipped = (v.numPendingTests ?? 0) + (p.stats?.skipped ?? 0)
console.log(`\nunit+server: ${v.numPassedTests} passed; browser: ${p.stats?.expected ?? 0} passed`)
console.log(`${passed} passed, ${failed} failed, ${skipped} skipped`)
// A skipped test fails the run too: nothing may be quietly left out.
if (skipped > 0) console.error(`✗ ${skipped} test(s) skipped`)
process.exit(failed > 0 || passed === 0 || skipped > 0 ? 1 : 0)
