// npm run demo — builds if needed, starts the local fakes and the app on a migrated, demo-seeded SQLite
// file, prints the URLs and demo accounts, and stops everything on Ctrl-C.
// A small cluster: DATABASE_URL=postgres://… DEMO_INSTANCES=2 npm run demo starts that many app
// processes on PORT, PORT+1, … against the one PostgreSQL database, sharing the session secret and the fakes.
import { spawn, spawnSync } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { existsSync, mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs'
import { dirname, join, resolve } from 'node:path'

const root = resolve(dirname(new URL(import.meta.url).pathname), '..')
process.chdir(root)
const PORT = process.env.PORT || '3000'
const DB_PATH = process.env.NUXT_DB_PATH || 'data/umbrafield.sqlite'
const APP_URL = process.env.NUXT_PUBLIC_APP_URL || `http://localhost:${PORT}`
const DATABASE_URL = /^postgres(ql)?:\/\//i.test(process.env.DATABASE_URL || '') ? process.env.DATABASE_URL : ''
const INSTANCES = Math.max(1, Number(process.env.DEMO_INSTANCES || 1))
if (INSTANCES > 1 && !DATABASE_URL) {
  console.error('DEMO_INSTANCES > 1 needs a shared database: set DATABASE_URL=postgres://… (SQLite is for one process).')
  process.exit(1)
}
const ports = Array.from({ length: INSTANCES }, (_, i) => String(Number(PORT) + i))

// 1. Build when there is no build or a source file is newer than it.
const SOURCES = ['app.vue', 'error.vue', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json', 'pages', 'components', 'composables', 'layouts', 'middleware', 'stores', 'server', 'shared', 'assets', 'public']
function newest(p) {
  if (!existsSync(p)) return 0
  const s = statSync(p)
  if (!s.isDirectory()) return s.mtimeMs
  return readdirSync(p).reduce((m, f) => Math.max(m, newest(join(p, f))), s.mtimeMs)
}
const built = existsSync('.output/nitro.json') ? statSync('.output/nitro.json').mtimeMs : 0
if (!built || SOURCES.some((s) => newest(s) > built)) {
  console.log('Building Umbrafield (about half a minute)…')
  const r = spawnSync('npx', ['nuxt', 'build'], { stdio: ['ignore', 'pipe', 'pipe'], encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 })
  if (r.status !== 0) { console.error(r.stdout + r.stderr + '\nBuild failed.'); process.exit(1) }
}

// 2. A session secret for the demo, generated once and kept in a git-ignored file.
const secretFile = join(dirname(resolve(DB_PATH)), '.session-secret')
mkdirSync(dirname(secretFile), { recursive: true })
if (!existsSync(secretFile)) writeFileSync(secretFile, randomBytes(32).toString('hex'), { mode: 0o600 })
const sessionPassword = process.env.NUXT_SESSION_PASSWORD || readFileSync(secretFile, 'utf8').trim()
// The data key (personal data at rest, AES-256-GCM) beside it, likewise generated once and git-ignored.
const dataKeyFile = join(dirname(resolve(DB_PATH)), '.data-key')
if (!existsSync(dataKeyFile)) writeFileSync(dataKeyFile, randomBytes(32).toString('base64'), { mode: 0o600 })
const dataKey = process.env.NUXT_DATA_KEY || readFileSync(dataKeyFile, 'utf8').trim()

// An invented height model for trying the terrain check (demo data, not a real place's terrain).
const DEMO_TERRAIN = 'data/demo-ridge-tangier.tif'
if (!existsSync(DEMO_TERRAIN)) spawnSync('npx', ['tsx', 'scripts/make-demo-terrain.ts', DEMO_TERRAIN], { stdio: 'ignore' })

// 3. Local fakes for hosted services, then the app (which migrates and seeds at start-up).
const children = []
function start(name, cmd, args, env = {}) {
  const child = spawn(cmd, args, { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, ...env } })
  child.stdout.on('data', (d) => { if (process.env.DEMO_VERBOSE) process.stdout.write(`[${name}] ${d}`) })
  child.stderr.on('data', (d) => process.stderr.write(`[${name}] ${d}`))
  child.on('exit', (code, signal) => {
    if (!stopping) { console.error(`[${name}] stopped unexpectedly (${code ?? signal}); shutting down.`); stop(1) }
  })
  children.push(child)
  return child
}
let stopping = false
function stop(code = 0) {
  if (stopping) return
  stopping = true
  for (const c of children) c.kill('SIGTERM')
  setTimeout(() => process.exit(code), 300)
}
process.on('SIGINT', () => stop(0))
process.on('SIGTERM', () => stop(0))

const fakes = (await import('./fakes.mjs')).fakeServices()
const fakeEnv = {}
for (const f of fakes) {
  start(f.name, process.execPath, f.args, f.env)
  Object.assign(fakeEnv, f.appEnv)
}
const appEnv = {
  ...fakeEnv,
  NUXT_DB_PATH: DB_PATH, NUXT_SEED: 'demo', UMBRAFIELD_ALLOW_DEMO_SEED: '1', NUXT_SESSION_PASSWORD: sessionPassword, NUXT_DATA_KEY: dataKey, NUXT_PUBLIC_APP_URL: APP_URL,
  ...(DATABASE_URL ? { DATABASE_URL } : {}),
  // The demo's accounts share a published password: it listens on this machine only.
  NITRO_HOST: process.env.HOST || '127.0.0.1',
}

// 4. Start the app (the first instance migrates and seeds; the others start once it answers), and
// wait until each answers before saying where everything is.
async function waitFor(port) {
  const deadline = Date.now() + 90_000
  for (;;) {
    try {
      const r = await fetch(`http://127.0.0.1:${port}/api/health`)
      if (r.ok) return
    } catch { /* not up yet */ }
    if (Date.now() > deadline) { console.error(`The app on port ${port} did not start within 90 s.`); stop(1) }
    await new Promise((r) => setTimeout(r, 300))
  }
}
for (const [i, port] of ports.entries()) {
  start(INSTANCES > 1 ? `app ${i + 1}` : 'app', process.execPath, ['.output/server/index.mjs'], { ...appEnv, PORT: port })
  await waitFor(port)
}
// The demo's trips follow the business date (UMBRAFIELD_FIXED_DATE pins it): list what the app publishes.
async function publishedTrips() {
  try {
    const list = await (await fetch(`http://127.0.0.1:${ports[0]}/api/trips`)).json()
    const out = []
    for (const t of list.data) {
      const d = await (await fetch(`http://127.0.0.1:${ports[0]}/api/trips/${t.id}`)).json()
      out.push(`    ${t.eclipseId}  ${(d.eclipse?.kind ?? '?').padEnd(8)} ${t.title} (from ${t.startDate}; site: ${t.site.name})`)
    }
    return out.join('\n')
  } catch (e) {
    return `    (could not list the trips: ${e.message})`
  }
}
const tripLines = await publishedTrips()
console.log(`
  Umbrafield demo is running (demo data: an invented company, Kestrel Sky Journeys)

  App            ${APP_URL}${INSTANCES > 1 ? `\n${ports.map((p, i) => `  Instance ${i + 1}     http://localhost:${p}`).join('\n')}` : ''}
${fakes.map((f) => `  ${f.label.padEnd(14)} ${f.url}`).join('\n')}
  Database       ${DATABASE_URL ? `PostgreSQL ${DATABASE_URL.replace(/\/\/[^@/]*@/, '//')}` : DB_PATH}

  Demo accounts (password: eclipse-demo)
    organiser@umbrafield.test   organiser
    guide@umbrafield.test       guide
    traveller@umbrafield.test   traveller
    traveller2@umbrafield.test  traveller with a confirmed booking (open its briefing)

  Best ground: Site planning → a workspace → "Show expected seen seconds" and "Find the best ground near here".
  Terrain check: upload ${DEMO_TERRAIN} there (an invented ridge in front of Tangier Cap Spartel; demo data).

  New accounts confirm their address through the link in the mail inbox above before they can hold seats.
  Published demo trips${process.env.UMBRAFIELD_FIXED_DATE ? ` (business date pinned to ${process.env.UMBRAFIELD_FIXED_DATE})` : ''}:
${tripLines}

  Press Ctrl-C to stop.
`)
