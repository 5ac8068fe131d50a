import { afterAll, describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { openDatabase } from '../../server/database/connection'
import { advanceClock, api, inviteAndChoosePassword, ORGANISER, signIn, TEST_DB, useApp } from './app'

// The seat counter against the rows, after races of every kind of seat change, on the database this
// run uses (SQLite, or PostgreSQL under scripts/with-postgres.mjs). Holds of 5 minutes and offers of
// 24 hours lapse by moving the app's clock.
const HOLD_MINUTES = 5
const OFFER_HOURS = 24
const { dbTarget } = await useApp({ NUXT_HOLD_MINUTES: String(HOLD_MINUTES), NUXT_OFFER_HOURS: String(OFFER_HOURS), UMBRAFIELD_HOLD_LIMIT: '1000' })
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

/** Counted straight from the rows, written here on its own: held and confirmed bookings, live offers. */
async function fromRows(tripId: number) {
  const r = await sql<{ booked: number | string; offered: number | string }>`select
    (select coalesce(sum(seats), 0) from bookings where trip_id = ${tripId} and status in ('held', 'confirmed')) as booked,
    (select coalesce(sum(seats), 0) from waitlist where trip_id = ${tripId} and status = 'offered') as offered`.execute(db)
  return { booked: Number(r.rows[0]!.booked), offered: Number(r.rows[0]!.offered) }
}
async function counter(tripId: number) {
  const r = await db.selectFrom('seat_counters').select('claimed').where('trip_id', '=', tripId).executeTakeFirst()
  return r ? Number(r.claimed) : undefined
}
let checks = 0
/** The counter equals the rows, and no more seats are out than the trip has. */
async function expectExact(tripId: number, seats: number) {
  const rows = await fromRows(tripId)
  expect(await counter(tripId)).toBe(rows.booked + rows.offered)
  expect(rows.booked + rows.offered).toBeLessThanOrEqual(seats)
  checks++
  return rows
}

async function account(org: string, label: string) {
  const email = `${label}-${Math.random().toString(36).slice(2, 8)}@umbrafield.test`
  const inv = await inviteAndChoosePassword(org, { name: `${label} (test)`, email, role: 'guide' }, `${label}-password`)
  expect(inv.status).toBe(201)
  const user = await db.selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()
  expect((await api(`/api/users/${user.id}`, { method: 'PATCH', body: { role: 'traveller' }, cookie: org })).status).toBe(200)
  return { email, id: user.id, cookie: await signIn(email, `${label}-password`) }
}

async function publishedTrip(org: string, seats: number) {
  const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
    workspaceId: 1, primarySiteId: 4, title: `Counter trip of ${seats}`, startDate: '2027-07-31', endDate: '2027-08-03', seats,
    priceMinor: 1000, depositMinor: 500, currency: 'eur', balanceDueDate: '2027-05-01', meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
  } })
  expect(trip.status).toBe(201)
  expect((await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
  return trip.body.id as number
}

describe(`the seat counter (${TEST_DB})`, () => {
  it('equals the held and confirmed seats (and live offers) after racing holds, changes, cancellations, expiries and offers', async () => {
    const SEATS = 6
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, SEATS)
    const people = await Promise.all(Array.from({ length: 10 }, (_, i) => account(org, `counter${i}`)))
    const hold = (p: { cookie: string }, seats: number) => api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie: p.cookie })

    // 1. Ten travellers race for six seats, one or two each.
    const first = await Promise.all(people.map((p, i) => hold(p, 1 + (i % 2))))
    for (const r of first) expect(r.status === 201 ? 'held' : r.body.code).toMatch(/^(held|sold_out|not_enough_seats)$/)
    const r1 = await expectExact(tripId, SEATS)
    expect(r1.booked).toBeGreaterThanOrEqual(SEATS - 1) // refused only when a seat too few was left
    const holders = people.map((p, i) => ({ ...p, booking: first[i]!.status === 201 ? first[i]!.body.id as number : null }))
    const held = holders.filter((h) => h.booking)
    const refused = holders.filter((h) => !h.booking)

    // 2. At once: holders change their seat counts up and down, others cancel, the refused try again.
    const second = await Promise.all([
      ...held.map((h, i) => i % 3 === 0
        ? api(`/api/bookings/${h.booking}/cancel`, { method: 'POST', cookie: h.cookie })
        : api(`/api/bookings/${h.booking}`, { method: 'PATCH', body: { seats: 1 + ((i + 1) % 3) }, cookie: h.cookie })),
      ...refused.map((p) => hold(p, 1)),
    ])
    for (const r of second) expect([200, 201, 409]).toContain(r.status)
    await expectExact(tripId, SEATS)

    // 3. The waitlist: seats still free go one by one to those without; the rest queue; then one
    // holder cancels, which offers the freed seat to the first in line.
    const heldNow = async () => db.selectFrom('bookings').select(['id', 'user_id']).where('trip_id', '=', tripId).where('status', '=', 'held').execute()
    for (const p of people) {
      if ((await heldNow()).some((b) => b.user_id === p.id)) continue
      if ((await fromRows(tripId)).booked < SEATS) await hold(p, 1)
    }
    const refreshed = await heldNow()
    const without = people.filter((p) => !refreshed.some((b) => b.user_id === p.id))
    expect(without.length).toBeGreaterThan(0)
    for (const p of without) expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: p.cookie })).status).toBe(201)
    const canceller = people.find((p) => p.id === refreshed[0]!.user_id)!
    expect((await api(`/api/bookings/${refreshed[0]!.id}/cancel`, { method: 'POST', cookie: canceller.cookie })).status).toBe(200)
    const r3 = await expectExact(tripId, SEATS)
    expect(r3.offered).toBeGreaterThan(0) // the freed seat went to an offer

    // 4. Every hold lapses; the waitlisted (offered or not) and everyone else race again: the first
    // requests let the lapsed holds go while the others hand seats out.
    await advanceClock(HOLD_MINUTES * 60_000 + 60_000)
    const fourth = await Promise.all(people.map((p) => hold(p, 1)))
    for (const r of fourth) expect([201, 409]).toContain(r.status)
    const r4 = await expectExact(tripId, SEATS)
    expect(r4.booked).toBeGreaterThan(0)
    const lapsed = await db.selectFrom('bookings').select('id').where('trip_id', '=', tripId).where('status', '=', 'expired').execute()
    expect(lapsed.length).toBeGreaterThan(0)

    // 5. Offers lapse too; everything is let go by the next hold, and the counter follows.
    await advanceClock(OFFER_HOURS * 3600_000 + 60_000)
    await Promise.all(people.slice(0, 4).map((p) => hold(p, 2)))
    await expectExact(tripId, SEATS)
    expect(checks).toBe(5)
  }, 120_000)

  it('a trip made without a counter (demo seed) gets one counted from its rows at the first hold', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, 4)
    const someone = await account(org, 'seeded')
    // As the demo seed does: a booking written straight to the table, and no counter row.
    await db.insertInto('bookings').values({ trip_id: tripId, user_id: someone.id, seats: 3, status: 'confirmed', hold_expires_at: null, price_minor: 3000, deposit_minor: 1500, paid_minor: 1500, currency: 'eur' }).execute()
    await db.deleteFrom('seat_counters').where('trip_id', '=', tripId).execute()
    const p = await account(org, 'afterseed')
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 2 }, cookie: p.cookie })).body.code).toBe('not_enough_seats')
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: p.cookie })).status).toBe(201)
    expect((await expectExact(tripId, 4)).booked).toBe(4)
  })
})
