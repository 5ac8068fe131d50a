// npm run --silent faults — a fault drill (not part of `npm test`; needs a build: `npx nuxt build`).
//
// On a throwaway PostgreSQL, two app instances (the built app, same database and secrets), the
// Stripe fake and the mail catcher, all on free loopback ports: 200 travellers each try to hold one
// seat of a 50-seat trip through both instances while the held seats are paid; one instance is
// killed (SIGKILL) mid-burst and started again; PostgreSQL is restarted once; refunds fail for a
// while at the fake and the mail catcher is down for a while. Then housekeeping, reconciliation and
// the mail worker are left to settle (at most SETTLE_MS), and the figures are counted from the
// database, the fake's state and the catcher's inbox. The last line is the verdict; exit 0 only
// when every count in it is 0. Every request goes to 127.0.0.1.
import { spawn } from 'node:child_process'
import { randomBytes } from 'node:crypto'
import { createWriteStream, existsSync, mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join, resolve } from 'node:path'
import pg from 'pg'
import { freePort } from './free-port.mjs'
import { startPostgres } from './pg-cluster.mjs'

const root = resolve(dirname(new URL(import.meta.url).pathname), '..')
process.chdir(root)

const TRAVELLERS = 200
const SEATS = 50
const PRICE_MINOR = 100_000
const DEPOSIT_MINOR = 20_000
/** Holds answered before one instance is killed (mid-burst). */
const KILL_AFTER = 60
/** Paid bookings cancelled while refunds fail at the fake (each asks for a full refund). */
const CANCELS = 8
/** How long refunds fail and the mail catcher is down. */
const OUTAGE_MS = 12_000
/** Longest wait for everything to settle. */
const SETTLE_MS = 180_000
/** Longest wait for an app instance to answer /api/health. */
const START_MS = 120_000

if (!existsSync('.output/server/index.mjs')) {
  console.error('faults: no build: run "npx nuxt build" first')
  process.exit(2)
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms))
const work = mkdtempSync(join(tmpdir(), 'umbrafield-faults-'))
const children = new Set()
let pgc = null

function launch(name, args, env) {
  const log = createWriteStream(join(work, `${name}.log`), { flags: 'a' })
  const child = spawn(process.execPath, args, { env: { ...process.env, ...env }, stdio: ['ignore', 'pipe', 'pipe'] })
  child.stdout.pipe(log)
  child.stderr.pipe(log)
  children.add(child)
  child.on('exit', () => children.delete(child))
  return child
}
async function stopChild(child, signal = 'SIGTERM') {
  if (!child || child.exitCode !== null || child.signalCode !== null) return
  const gone = new Promise((r) => child.once('exit', r))
  child.kill(signal)
  await Promise.race([gone, sleep(5000)])
}
async function cleanup(keepLogs = false) {
  for (const c of [...children]) await stopChild(c)
  try { pgc?.stop() } catch { /* already down */ }
  for (const f of ['mail']) rmSync(join(work, f), { recursive: true, force: true })
  if (keepLogs) console.error(`faults: logs of the apps, the fake and the catcher are in ${work}`)
  else rmSync(work, { recursive: true, force: true })
}
process.on('SIGINT', async () => { await cleanup(); process.exit(130) })

async function waitHealthy(base, ms = START_MS) {
  const end = Date.now() + ms
  while (Date.now() < end) {
    try { if ((await fetch(`${base}/api/health`)).ok) return true } catch { /* starting */ }
    await sleep(250)
  }
  throw new Error(`${base} did not become healthy within ${ms / 1000} s (logs in ${work})`)
}

async function main() {
  const t0 = Date.now()
  pgc = await startPostgres()
  const admin = new pg.Client(pgc.url)
  await admin.connect()
  await admin.query('create database faults')
  await admin.end()
  const databaseUrl = pgc.url.replace(/\/postgres$/, '/faults')

  const [portA, portB, stripePort, smtpPort, webPort] = await Promise.all([freePort(), freePort(), freePort(), freePort(), freePort()])
  const bases = [`http://127.0.0.1:${portA}`, `http://127.0.0.1:${portB}`]
  const stripeBase = `http://127.0.0.1:${stripePort}`
  const inboxBase = `http://127.0.0.1:${webPort}`
  const webhookSecret = `whsec_faults_${randomBytes(8).toString('hex')}`

  // The mail catcher keeps its mail in a folder, so the inbox survives its own restart.
  const mailDir = join(work, 'mail')
  const startCatcher = () => launch('mail', ['node_modules/maildev/dist/bin/maildev.js', '--smtp', String(smtpPort), '--web', String(webPort),
    '--ip', '127.0.0.1', '--web-ip', '127.0.0.1', '--mail-directory', mailDir, '--max-emails', '0', '--silent'], {})
  const waitCatcher = async () => {
    for (let i = 0; i < 100; i++) { try { if ((await fetch(`${inboxBase}/api/email`)).ok) return } catch { /* starting */ } await sleep(200) }
    throw new Error('the mail catcher did not start')
  }
  const catcher = startCatcher()
  await waitCatcher()
  // Webhooks go to instance A, the one that gets killed: the fake retries, reconciliation covers the rest.
  launch('stripe', ['fakes/stripe/server.mjs'], { STRIPE_FAKE_PORT: String(stripePort), STRIPE_WEBHOOK_SECRET: webhookSecret, STRIPE_FAKE_WEBHOOK_URL: `${bases[0]}/api/stripe/webhook` })
  for (let i = 0; i < 100; i++) { try { if ((await fetch(`${stripeBase}/_fake/health`)).ok) break } catch { /* starting */ } await sleep(200) }

  const appEnv = {
    DATABASE_URL: databaseUrl, NUXT_SEED: 'demo', NUXT_PUBLIC_APP_URL: bases[0],
    NUXT_SESSION_PASSWORD: randomBytes(24).toString('hex'), NUXT_BACKUPS: 'off',
    NUXT_STRIPE_SECRET_KEY: 'sk_test_umbrafield_local_fake', NUXT_STRIPE_WEBHOOK_SECRET: webhookSecret,
    NUXT_STRIPE_API_HOST: '127.0.0.1', NUXT_STRIPE_API_PORT: String(stripePort), NUXT_STRIPE_API_PROTOCOL: 'http',
    NUXT_MAIL_SMTP_HOST: '127.0.0.1', NUXT_MAIL_SMTP_PORT: String(smtpPort), NUXT_MAIL_SMTP_SECURE: 'false',
    NUXT_MAIL_FROM: 'Kestrel Sky Journeys (demo) <trips@umbrafield.test>',
    NITRO_HOST: '127.0.0.1', NUXT_TRUSTED_PROXIES: '127.0.0.1', UMBRAFIELD_SIGNUP_LIMIT: '100000', UMBRAFIELD_HOLD_LIMIT: '100000',
    // Housekeeping, reconciliation and the mail worker on drill time rather than production time.
    UMBRAFIELD_HOUSEKEEPING_MS: '2000', UMBRAFIELD_RECONCILE_AFTER_MS: '3000', UMBRAFIELD_REFUND_RETRY_MS: '1000',
    UMBRAFIELD_LEDGER_RECONCILE_MS: '5000', UMBRAFIELD_MAIL_POLL_MS: '500', UMBRAFIELD_MAIL_BACKOFF_MS: '1000', UMBRAFIELD_MAIL_MAX_ATTEMPTS: '30',
  }
  const apps = [null, null]
  const startApp = (i) => { apps[i] = launch(`app-${i ? 'b' : 'a'}`, ['.output/server/index.mjs'], { ...appEnv, PORT: String(i ? portB : portA) }) }
  startApp(0)
  await waitHealthy(bases[0])
  startApp(1)
  await waitHealthy(bases[1])

  // A client that falls over to the other instance when one does not answer (as a load balancer would).
  let failovers = 0
  const addr = (i) => `10.${Math.floor(i / 250)}.${i % 250}.9`
  async function call(i, path, { method = 'POST', body, cookie = '', prefer = i % 2 } = {}) {
    for (let attempt = 0; attempt < 40; attempt++) {
      const base = bases[(prefer + attempt) % 2]
      try {
        const r = await fetch(`${base}${path}`, {
          method, headers: { 'content-type': 'application/json', cookie, 'x-forwarded-for': addr(i) },
          body: body === undefined ? undefined : JSON.stringify(body), signal: AbortSignal.timeout(30_000),
        })
        if (r.status >= 500 && r.status !== 501) throw new Error(`status ${r.status}`)
        return r
      } catch {
        failovers++
        await sleep(250)
      }
    }
    throw new Error(`no instance answered ${method} ${path}`)
  }
  const cookieOf = (r) => r.headers.getSetCookie().map((c) => c.split(';')[0]).join('; ')

  // The trip: 50 seats, full refund on cancellation while the drill runs.
  const org = cookieOf(await call(0, '/api/auth/login', { body: { email: 'organiser@umbrafield.test', password: 'eclipse-demo' } }))
  const ws = await (await call(0, '/api/workspaces', { method: 'GET', cookie: org })).json()
  const workspaceId = ws.data[0].id
  const sites = await (await call(0, `/api/workspaces/${workspaceId}/sites`, { method: 'GET', cookie: org })).json()
  const site = (sites.data ?? sites).find((s) => s.pinned) ?? (sites.data ?? sites)[0]
  const wsRow = ws.data[0]
  const eclipseDay = wsRow.eclipseId ?? wsRow.eclipse_id
  const dayBefore = (d, n) => new Date(Date.parse(`${d}T00:00:00Z`) - n * 86_400_000).toISOString().slice(0, 10)
  const tripRes = await call(0, '/api/trips', { cookie: org, body: {
    workspaceId, primarySiteId: site.id, title: 'Fault drill trip (demo)', startDate: dayBefore(eclipseDay, 2), endDate: eclipseDay, seats: SEATS,
    priceMinor: PRICE_MINOR, depositMinor: DEPOSIT_MINOR, currency: 'eur', balanceDueDate: dayBefore(eclipseDay, 30),
    cancellationTiers: [{ until: dayBefore(eclipseDay, 30), refundPct: 100 }],
    meetingPoint: { name: 'Drill meeting point (demo)', lat: site.lat, lon: site.lon, time: `${eclipseDay}T00:00:00Z` },
  } })
  if (tripRes.status !== 201 && tripRes.status !== 200) throw new Error(`trip not created: ${tripRes.status} ${await tripRes.text()}`)
  const trip = await tripRes.json()
  await call(0, `/api/trips/${trip.id}/publish`, { cookie: org, body: {} })

  // 200 travellers: signed up through both instances, addresses confirmed in the database (the drill
  // does not click 200 links), signed in on the instance they book through.
  const emails = Array.from({ length: TRAVELLERS }, (_, i) => `drill${i}@faults.test`)
  const password = 'drill-password-123'
  const batches = async (items, size, f) => { for (let i = 0; i < items.length; i += size) await Promise.all(items.slice(i, i + size).map((x, j) => f(x, i + j))) }
  // One sign-up through the app; the other travellers are copies of it in the database (same
  // password hash), which spares 199 password hashings on a small machine.
  const signup = await call(0, '/api/auth/register', { body: { name: 'Drill traveller 0 (demo)', email: emails[0], password } })
  if (signup.status >= 300) throw new Error(`sign-up failed: ${signup.status} ${await signup.text()}`)
  const q = new pg.Pool({ connectionString: databaseUrl, max: 4 })
  q.on('error', () => { /* the drill restarts PostgreSQL; the pool reconnects */ })
  const query = async (text, params) => {
    for (let k = 0; ; k++) {
      try { return (await q.query(text, params)).rows } catch (e) { if (k >= 40) throw e; await sleep(500) }
    }
  }
  await query(`insert into users (email, name, role, password_hash)
    select 'drill' || n || '@faults.test', 'Drill traveller ' || n || ' (demo)', role, password_hash
    from users, generate_series(1, $1::int - 1) as n where email = $2`, [TRAVELLERS, emails[0]])
  await query(`update users set email_confirmed_at = created_at where email like '%@faults.test'`)
  const cookies = []
  await batches(emails, 20, async (email, i) => { cookies[i] = cookieOf(await call(i, '/api/auth/login', { body: { email, password } })) })
  const setupSec = Math.round((Date.now() - t0) / 1000)

  // The burst: holds through both instances, each held seat paid at once; one instance dies mid-way.
  const fig = { tried: 0, held: 0, soldOut: 0, otherStatus: 0, checkouts: 0, paid: 0, killed: 0, restarted: 0 }
  const bookingOf = new Map() // traveller index → booking id
  const payments = []
  let answered = 0
  let killDone = null
  async function pay(i, bookingId) {
    const r = await call(i, `/api/bookings/${bookingId}/checkout`, { cookie: cookies[i], body: {} })
    if (r.status !== 200 && r.status !== 201) return
    const { url } = await r.json()
    fig.checkouts++
    const session = new URL(url).pathname.split('/').pop()
    const done = await fetch(`${stripeBase}/_fake/checkout/sessions/${session}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: '{}' })
    if ((await done.json()).ok) fig.paid++
  }
  const order = Array.from({ length: TRAVELLERS }, (_, i) => i)
  let next = 0
  const racer = async () => {
    while (next < order.length) {
      const i = order[next++]
      fig.tried++
      const r = await call(i, `/api/trips/${trip.id}/bookings`, { cookie: cookies[i], body: { seats: 1 } })
      answered++
      if (r.status === 201) {
        fig.held++
        const b = await r.json()
        bookingOf.set(i, b.id)
        payments.push(pay(i, b.id))
      } else if (r.status === 409) fig.soldOut++
      else fig.otherStatus++
      if (answered === KILL_AFTER && !killDone) {
        killDone = (async () => {
          apps[0].kill('SIGKILL')
          fig.killed++
          await sleep(1500)
          startApp(0)
          fig.restarted++
          await waitHealthy(bases[0])
        })()
      }
    }
  }
  await Promise.all(Array.from({ length: 25 }, racer))
  await Promise.allSettled(payments)
  await killDone

  // PostgreSQL restarts once, with webhooks and reconciliation still in flight.
  pgc.restart()
  const pgRestarts = 1
  await Promise.all(bases.map((b) => waitHealthy(b, 60_000)))
  // Both instances must answer a query that reads the database again.
  let afterRestartOk = 0
  for (const [k, b] of bases.entries()) {
    for (let n = 0; n < 40; n++) {
      const r = await fetch(`${b}/api/trips`).catch(() => null)
      if (r?.ok) { afterRestartOk++; break }
      await sleep(k + 500)
    }
  }

  // Wait until the held seats are confirmed (webhooks or reconciliation), so the cancellations refund money.
  const confirmedNow = async () => Number((await query(`select count(*) as n from bookings where trip_id = $1 and status = 'confirmed'`, [trip.id]))[0].n)
  for (let end = Date.now() + 60_000; Date.now() < end && (await confirmedNow()) < fig.paid;) await sleep(1000)

  // Refunds fail at the fake and the mail catcher is down, while travellers cancel paid bookings.
  await fetch(`${stripeBase}/_fake/refunds/fail`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ on: true }) })
  await stopChild(catcher)
  const catcherStops = 1
  const confirmed = await query(`select b.id, u.email from bookings b join users u on u.id = b.user_id where b.trip_id = $1 and b.status = 'confirmed' order by b.id limit $2`, [trip.id, CANCELS])
  let cancelled = 0
  for (const row of confirmed) {
    const i = emails.indexOf(row.email)
    const r = await call(i, `/api/bookings/${row.id}/cancel`, { cookie: cookies[i], body: {} })
    if (r.ok) cancelled++
  }
  await sleep(OUTAGE_MS)
  const failedDuringOutage = (await (await fetch(`${stripeBase}/_fake/state`)).json()).refundsFailed
  await fetch(`${stripeBase}/_fake/refunds/fail`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ on: false }) })
  startCatcher() // stopped by cleanup() with the other children
  await waitCatcher()

  // Settle: poll until nothing is pending and two readings agree, at most SETTLE_MS.
  const reading = async () => {
    const [r] = await query(`select
      (select count(*) from refunds where status <> 'succeeded') as refunds_open,
      (select count(*) from payments where status = 'pending' and demo = 0) as payments_open,
      (select count(*) from outbox where status <> 'sent') as mail_open,
      (select count(*) from bookings where trip_id = $1 and status = 'held') as held_open`, [trip.id])
    return r
  }
  const settleStart = Date.now()
  let last = ''
  let stable = false
  while (Date.now() - settleStart < SETTLE_MS) {
    const r = await reading()
    const key = JSON.stringify(r)
    const quiet = Number(r.refunds_open) === 0 && Number(r.mail_open) === 0
    if (quiet && key === last) { stable = true; break }
    last = key
    await sleep(3000)
  }
  const settleSec = Math.round((Date.now() - settleStart) / 1000)

  // The counts.
  const bookings = await query(`select id, status, seats, paid_minor, deposit_minor from bookings where trip_id = $1`, [trip.id])
  const live = bookings.filter((b) => b.status === 'confirmed' || b.status === 'held').reduce((s, b) => s + Number(b.seats), 0)
  const oversold = Math.max(0, live - SEATS)
  const unpaidConfirmed = bookings.filter((b) => b.status === 'confirmed' && Number(b.paid_minor) < Number(b.deposit_minor)).length
  let ledgerMismatches = 0
  for (const b of bookings) {
    const pays = await query(`select amount_minor, checkout_session_id from payments where booking_id = $1 and status = 'succeeded' and demo = 0`, [b.id])
    const refs = await query(`select amount_minor, status, stray from refunds where booking_id = $1`, [b.id])
    const ledgerNet = pays.reduce((s, p) => s + Number(p.amount_minor), 0) - refs.filter((r) => r.status === 'succeeded').reduce((s, r) => s + Number(r.amount_minor), 0)
    const appNet = Number(b.paid_minor) - refs.filter((r) => r.status === 'succeeded' && Number(r.stray) === 0).reduce((s, r) => s + Number(r.amount_minor), 0)
    // Every checkout the booking ever had, paid or not: the fake may hold money the ledger never saw.
    const sessions = (await query(`select checkout_session_id from payments where booking_id = $1 and checkout_session_id is not null`, [b.id])).map((p) => p.checkout_session_id)
    const held = sessions.length ? (await (await fetch(`${stripeBase}/_fake/holdings?sessions=${sessions.join(',')}`)).json()).netMinor : 0
    const open = refs.some((r) => r.status !== 'succeeded')
    if (appNet !== ledgerNet || held !== ledgerNet || open) ledgerMismatches++
  }
  const outbox = await query(`select message_id, status from outbox`)
  const inbox = await (await fetch(`${inboxBase}/api/email`)).json()
  const ids = new Map()
  for (const m of inbox) {
    const id = String(m.messageId ?? m.headers?.['message-id'] ?? '').replace(/^<|>$/g, '')
    ids.set(id, (ids.get(id) ?? 0) + 1)
  }
  const norm = (id) => String(id).replace(/^<|>$/g, '')
  const sentRows = outbox.filter((m) => m.status === 'sent')
  const lostMails = sentRows.filter((m) => !ids.has(norm(m.message_id))).length + outbox.filter((m) => m.status !== 'sent').length
  const duplicateMails = [...ids.values()].filter((n) => n > 1).length
  const outboxIds = new Set(outbox.map((m) => norm(m.message_id)))
  const strangers = inbox.filter((m) => !outboxIds.has(String(m.messageId ?? m.headers?.['message-id'] ?? '').replace(/^<|>$/g, '')))
  for (const m of strangers) console.error(`in the inbox, not in the outbox: ${JSON.stringify({ messageId: m.messageId ?? null, subject: m.subject ?? null, to: m.to ?? null, date: m.date ?? null })}`)
  // What went wrong, on stderr, so the figures on stdout stay one a line.
  for (const [id, n] of ids) if (n > 1) console.error(`duplicate: ${id} ×${n} (${JSON.stringify((await query(`select kind, attempts, status from outbox where message_id = $1 or message_id = $2`, [id, `<${id}>`]))[0] ?? null)})`)
  for (const m of sentRows) if (!ids.has(norm(m.message_id))) console.error(`lost: ${m.message_id}`)
  const fake = await (await fetch(`${stripeBase}/_fake/state`)).json()
  const refundRows = await query(`select count(*) filter (where status = 'succeeded') as ok, count(*) as n, coalesce(sum(attempts), 0) as attempts from refunds`)

  const lines = [
    `travellers ${TRAVELLERS}, seats ${SEATS}, two app instances on PostgreSQL (set-up ${setupSec} s)`,
    `holds tried ${fig.tried}`,
    `held ${fig.held}`,
    `sold out ${fig.soldOut}`,
    `other answers ${fig.otherStatus}`,
    `requests that failed over to the other instance ${failovers}`,
    `checkouts started ${fig.checkouts}`,
    `paid at the fake ${fig.paid}`,
    `app instances killed ${fig.killed}, restarted ${fig.restarted}`,
    `PostgreSQL restarts ${pgRestarts}, instances reading the database again ${afterRestartOk} of 2`,
    `bookings cancelled during the outage ${cancelled}`,
    `refund attempts failed at the fake ${failedDuringOutage}`,
    `refunds made ${refundRows[0].ok} of ${refundRows[0].n}`,
    `mail catcher stops ${catcherStops}, restarts ${catcherStops}`,
    `mails queued ${outbox.length}`,
    `mails sent ${sentRows.length}`,
    `mails in the inbox ${inbox.length}`,
    `mails in the inbox that no outbox row sent ${strangers.length}`,
    `seats confirmed or held ${live} of ${SEATS}`,
    `settled ${stable ? 'in' : 'NOT within'} ${settleSec} s`,
    `webhook events ${fake.events.length}, delivered ${fake.events.filter((e) => e.delivered).length}`,
  ]
  for (const l of lines) console.log(l)
  const verdict = { oversold, ledgerMismatches, unpaidConfirmed, lostMails, duplicateMails }
  console.log(`faults: oversold ${oversold}, ledger mismatches ${ledgerMismatches}, unpaid confirmed ${unpaidConfirmed}, lost mails ${lostMails}, duplicate mails ${duplicateMails}`)
  await q.end().catch(() => {})
  return Object.values(verdict).every((v) => v === 0) ? 0 : 1
}

let code
try {
  code = await main()
} catch (e) {
  console.error(`faults: the drill could not run: ${e.message}`)
  code = 2
} finally {
  await cleanup(code !== 0)
}
process.exit(code)
