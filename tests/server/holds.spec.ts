import { url } from '@nuxt/test-utils/e2e'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { advanceClock, api, inviteAndChoosePassword, ORGANISER, signIn, STRIPE_FAKE, TEST_DB, TRAVELLER, TRAVELLER2, until, useApp } from './app'

// Holds of 5 minutes and waitlist offers of 24 hours, lapsed by moving the app's clock; at most 3
// hold requests per account in 10 minutes (the window of the route's limit).
const HOLD_MINUTES = 5
const OFFER_HOURS = 24
const HOLD_WINDOW_MS = 10 * 60_000
const { dbTarget } = await useApp({ NUXT_HOLD_MINUTES: String(HOLD_MINUTES), NUXT_OFFER_HOURS: String(OFFER_HOURS), UMBRAFIELD_HOLD_LIMIT: '3' })
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

describe('lapsed holds', () => {
  it('a declined card leaves the hold to lapse, and the seats return', async () => {
    const org = await signIn(ORGANISER)
    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: 1, primarySiteId: 4, title: 'Two-seat trip', startDate: '2027-07-31', endDate: '2027-08-03', seats: 2,
      priceMinor: 1000, depositMinor: 500, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
    } })
    await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })
    const trav = await signIn(TRAVELLER)
    const hold = await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 2 }, cookie: trav })
    expect(hold.status).toBe(201)
    // One hold per traveller per trip: a second one is refused with the hold to change instead.
    const second = await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    expect(second.status).toBe(409)
    expect(second.body).toMatchObject({ code: 'hold_exists', bookingId: hold.body.id, seats: 2 })
    expect((await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(TRAVELLER2) })).body.code).toBe('sold_out')
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    const r = await (await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${c.body.url.split('/pay/')[1]}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome: 'declined' }) })).json()
    expect(r.ok).toBe(false)
    expect((await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.status).toBe('held')
    // Just before the end of the hold the seats are still taken; just after, they are free again.
    await advanceClock(HOLD_MINUTES * 60_000 - 30_000)
    expect((await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(TRAVELLER2) })).body.code).toBe('sold_out')
    await advanceClock(60_000)
    const again = await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 2 }, cookie: trav })
    expect(again.status).toBe(201)
    expect((await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.status).toBe('expired')
    expect((await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })).status).toBe(409)
    // The change-instead path: the active hold changes its seat count.
    const changed = await api(`/api/bookings/${again.body.id}`, { method: 'PATCH', body: { seats: 1 }, cookie: trav })
    expect(changed.body).toMatchObject({ id: again.body.id, seats: 1 })
    // Hold requests are rate-limited per account: three requests passed, the fourth does not.
    const limited = await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    expect(limited.status).toBe(429)
    expect(limited.headers.get('retry-after')).toMatch(/^\d+$/)
  })
})

/** An invited (so confirmed) account of its own, signed in; returns its cookie and user id. */
async function freshAccount(org: string, label: string) {
  const email = `${label}-${Math.random().toString(36).slice(2, 8)}@umbrafield.test`
  const password = `${label}-password`
  const inv = await inviteAndChoosePassword(org, { name: `${label} (test)`, email, role: 'guide' }, password)
  expect(inv.status).toBe(201)
  const user = await db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()
  // Invitations are for staff; made a traveller, the account may hold seats and be offered them.
  expect((await api(`/api/users/${user.id}`, { method: 'PATCH', body: { role: 'traveller' }, cookie: org })).status).toBe(200)
  return { email, id: user.id, cookie: await signIn(email, password) }
}

type Account = Awaited<ReturnType<typeof freshAccount>>

async function publishedTrip(org: string, seats: number) {
  const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
    workspaceId: 1, primarySiteId: 4, title: `${seats}-seat trip`, startDate: '2027-07-31', endDate: '2027-08-03', seats,
    priceMinor: 1000, depositMinor: 500, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
  } })
  expect(trip.status).toBe(201)
  expect((await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
  return trip.body.id as number
}

describe('waitlist offers', () => {
  it('an offer not taken up lapses after its hours; the seat goes to the next in line, then back on sale', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, 1)
    const [holder, first, second, other] = await Promise.all(['holder', 'first', 'second', 'other'].map((l) => freshAccount(org, l)))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: holder!.cookie })
    expect(hold.status).toBe(201)
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: first!.cookie })).body).toMatchObject({ status: 'waiting', position: 1 })
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: second!.cookie })).body).toMatchObject({ status: 'waiting', position: 2 })
    const table = async () => (await api(`/api/trips/${tripId}/bookings`, { cookie: org })).body as { waitlist: Array<{ email: string; status: string; offerExpiresAt: string | null }> }

    // The seat comes free: the first in line is offered it, for OFFER_HOURS.
    expect((await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: holder!.cookie })).status).toBe(200)
    const offered = await table()
    expect(offered.waitlist.map((w) => [w.email, w.status])).toEqual([[first!.email, 'offered'], [second!.email, 'waiting']])
    const now = Date.parse(await advanceClock(0))
    expect(Math.abs(Date.parse(offered.waitlist[0]!.offerExpiresAt!) - (now + OFFER_HOURS * 3600_000))).toBeLessThan(60_000)
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: other!.cookie })).body.code).toBe('sold_out')

    // A minute before the offer ends it still stands.
    await advanceClock(OFFER_HOURS * 3600_000 - 60_000)
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: other!.cookie })).body.code).toBe('sold_out')
    expect((await table()).waitlist[0]).toMatchObject({ email: first!.email, status: 'offered' })

    // Past it, housekeeping lets the offer lapse and offers the seat to the next in line.
    await advanceClock(2 * 60_000)
    const moved = await until(table, (t) => t.waitlist.length === 1 && t.waitlist[0]!.status === 'offered')
    expect(moved.waitlist.map((w) => [w.email, w.status])).toEqual([[second!.email, 'offered']])
    const outbox = (await api('/api/outbox', { cookie: org })).body.data as Array<{ kind: string; to: string; tripId: number }>
    expect(outbox.filter((m) => m.kind === 'waitlist-offer' && m.tripId === tripId).map((m) => m.to.match(/<(.*)>/)![1])).toEqual([second!.email, first!.email])
    // The lapsed offer is gone: its holder is refused like anyone else.
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: first!.cookie })).body.code).toBe('sold_out')

    // Nobody is left in line once the second offer lapses too: the seat is back on sale.
    await advanceClock(OFFER_HOURS * 3600_000 + 60_000)
    expect((await until(table, (t) => t.waitlist.length === 0)).waitlist).toEqual([])
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: other!.cookie })).status).toBe(201)
  })
})

describe(`the hold limit (${TEST_DB})`, () => {
  it('counts a burst that straddles a window boundary, and lets requests through once it is a window behind', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, 5)
    const me = await freshAccount(org, 'burst')
    const hold = () => api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: me.cookie })
    // Both set-ups keep a sliding window (per 1/60 of the window: in memory on SQLite, in
    // rate_limit_hits on PostgreSQL). Put the burst across a boundary of the fixed 10-minute windows
    // (multiples since 1970): three requests 20 s before it, the fourth 20 s after.
    const now = Date.parse(await advanceClock(0))
    let boundary = Math.ceil(now / HOLD_WINDOW_MS) * HOLD_WINDOW_MS
    if (boundary - now < 30_000) boundary += HOLD_WINDOW_MS
    await advanceClock(boundary - 20_000 - now)
    const burst = [await hold(), await hold(), await hold()]
    expect(burst.map((r) => r.status)).toEqual([201, 409, 409]) // one hold, then "change the seat count instead"
    await advanceClock(40_000)
    // A plain fixed window would start again from zero here and let three more through.
    const fourth = await hold()
    expect(fourth.status).toBe(429)
    // The burst left the sliding window 10 minutes after it began; the refusal itself is owed nothing.
    expect(Number(fourth.headers.get('retry-after'))).toBeGreaterThan(0)
    expect(Number(fourth.headers.get('retry-after'))).toBeLessThanOrEqual(HOLD_WINDOW_MS / 1000)
    const rows = await db.selectFrom('rate_limit_hits').select(['window_start', 'hits']).where('key', '=', `hold:${me.id}`).orderBy('window_start').execute()
    if (TEST_DB === 'PostgreSQL') {
      // Shared between instances: rows per 10-second slot on both sides of the boundary, holding the
      // three requests that passed; the refused fourth is not counted.
      const slotMs = HOLD_WINDOW_MS / 60
      expect(rows.reduce((n, r) => n + Number(r.hits), 0)).toBe(3)
      for (const r of rows) {
        const at = Date.parse(r.window_start)
        expect(at % slotMs).toBe(0)
        expect(Math.abs(at - boundary)).toBeLessThanOrEqual(30_000)
      }
      expect(rows.some((r) => Date.parse(r.window_start) < boundary && Number(r.hits) > 0)).toBe(true)
      expect(rows.some((r) => Date.parse(r.window_start) >= boundary)).toBe(true)
    } else {
      // One process: the window lives in memory and the table stays empty.
      expect(rows).toEqual([])
    }
    // A full window after the burst, requests pass again (and the first hold has lapsed: a new one).
    await advanceClock(HOLD_WINDOW_MS)
    expect((await hold()).status).toBe(201)
  })
})

describe(`holds on the trip's current terms (${TEST_DB})`, () => {
  // On PostgreSQL an instance remembers a trip's terms for a minute and its hold statement checks them
  // against the row; these edits go straight to the database, as another instance's would.
  it('a price, title, currency or status changed elsewhere is what the next hold gets', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, 5)
    const [a, b, c, d, e] = (await Promise.all(['terms-a', 'terms-b', 'terms-c', 'terms-d', 'terms-e'].map((l) => freshAccount(org, l)))) as Account[] as [Account, Account, Account, Account, Account]
    const holdFor = (who: Account) => api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: who.cookie })
    const bookingOf = (id: number) => db.selectFrom('bookings').select(['price_minor', 'deposit_minor', 'currency']).where('id', '=', id).executeTakeFirstOrThrow()
    const heldMail = (id: number) => db.selectFrom('outbox').select(['subject', 'text']).where('booking_id', '=', id).where('kind', '=', 'booking-held').executeTakeFirstOrThrow()
    expect((await holdFor(a)).status).toBe(201)
    // One change at a time, each read by the next hold.
    await db.updateTable('trips').set({ price_minor: 2500, deposit_minor: 700 }).where('id', '=', tripId).execute()
    const second = await holdFor(b)
    expect(second.status).toBe(201)
    expect(await bookingOf(second.body.id)).toEqual({ price_minor: 2500, deposit_minor: 700, currency: 'eur' })
    const secondMail = await heldMail(second.body.id)
    expect(secondMail.text).toContain('€7.00')
    expect(secondMail.text).toContain(`/bookings/${second.body.id}`)
    await db.updateTable('trips').set({ title: 'Renamed trip' }).where('id', '=', tripId).execute()
    const third = await holdFor(c)
    expect(third.status).toBe(201)
    expect((await heldMail(third.body.id)).subject).toContain('Renamed trip')
    await db.updateTable('trips').set({ currency: 'gbp' }).where('id', '=', tripId).execute()
    const fourth = await holdFor(d)
    expect(fourth.status).toBe(201)
    expect((await bookingOf(fourth.body.id)).currency).toBe('gbp')
    expect((await heldMail(fourth.body.id)).text).toContain('£7.00')
    await db.updateTable('trips').set({ status: 'draft' }).where('id', '=', tripId).execute()
    expect((await holdFor(e)).status).toBe(404)
    await db.updateTable('trips').set({ status: 'published', sales_open: 0 }).where('id', '=', tripId).execute()
    const closed = await holdFor(e)
    expect([closed.status, closed.body.data?.code]).toEqual([409, 'sales_closed'])
    // Nothing was written for the refused requests.
    expect(await db.selectFrom('bookings').select('id').where('trip_id', '=', tripId).where('user_id', '=', e.id).execute()).toEqual([])
  })

  it('a seat given back after the trip was full is held at once, with its e-mail and a counter that matches', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, 1)
    const [a, b] = (await Promise.all(['full-a', 'full-b'].map((l) => freshAccount(org, l)))) as [Account, Account]
    const held = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: a.cookie })
    expect(held.status).toBe(201)
    const refused = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: b.cookie })
    expect([refused.status, refused.body.code]).toEqual([409, 'sold_out'])
    expect((await api(`/api/bookings/${held.body.id}/cancel`, { method: 'POST', cookie: a.cookie })).status).toBe(200)
    const again = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: b.cookie })
    expect(again.status).toBe(201)
    const mails = await db.selectFrom('outbox').select(['booking_id', 'to_email']).where('trip_id', '=', tripId).where('kind', '=', 'booking-held').orderBy('id').execute()
    expect(mails.map((m) => [m.booking_id, m.to_email])).toEqual([[held.body.id, a.email], [again.body.id, b.email]])
    const counter = await db.selectFrom('seat_counters').select('claimed').where('trip_id', '=', tripId).executeTakeFirstOrThrow()
    expect(Number(counter.claimed)).toBe(1)
    if (TEST_DB === 'PostgreSQL') {
      // Each of b's two requests counted once against the hold limit, whichever statements answered them.
      const hits = await db.selectFrom('rate_limit_hits').select('hits').where('key', '=', `hold:${b.id}`).execute()
      expect(hits.reduce((n, r) => n + Number(r.hits), 0)).toBe(2)
    }
  })
})

describe('the test clock', () => {
  it('will not move for a body a cross-site page could send (text/plain): an ordinary 404, and the clock stays', async () => {
    const before = Date.parse(await advanceClock(0))
    const r = await fetch(url('/_test/clock'), { method: 'POST', headers: { 'content-type': 'text/plain' }, body: JSON.stringify({ advanceMs: 86_400_000 }) })
    expect(r.status).toBe(404)
    expect(Date.parse(await advanceClock(0)) - before).toBeLessThan(86_400_000)
  })
})
