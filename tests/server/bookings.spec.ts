import { describe, expect, it } from 'vitest'
import { advanceClock, api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, STRIPE_FAKE, TRAVELLER, TRAVELLER2, until, useApp } from './app'

// The racers below sign in from their own addresses, as a trusted proxy reports them: forty
// simultaneous sign-ins from one address would rightly be slowed by the per-address backoff.
// Checkouts still pending after 30 s of app time are asked about at Stripe (reconciliation); tests
// move the app's clock past that rather than wait.
const RECONCILE_AFTER_MS = 30_000
await useApp({ UMBRAFIELD_RECONCILE_AFTER_MS: String(RECONCILE_AFTER_MS), NUXT_TRUSTED_PROXIES: '127.0.0.1' })

const tripBody = (over: Record<string, unknown> = {}) => ({
  workspaceId: 1, primarySiteId: 4, backupSiteIds: [5], title: 'Test trip', startDate: '2027-07-31', endDate: '2027-08-03',
  seats: 10, priceMinor: 200_000, depositMinor: 40_000, currency: 'EUR', balanceDueDate: '2027-05-01',
  cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }], minGroupSize: 2,
  meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' }, ...over,
})

async function newTrip(org: string, over: Record<string, unknown> = {}) {
  const r = await api('/api/trips', { method: 'POST', body: tripBody(over), cookie: org })
  expect(r.status).toBe(201)
  expect((await api(`/api/trips/${r.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
  return r.body.id as number
}

async function pay(bookingId: number, cookie: string, outcome: 'succeeded' | 'declined' = 'succeeded') {
  const c = await api(`/api/bookings/${bookingId}/checkout`, { method: 'POST', cookie })
  expect(c.status).toBe(200)
  expect(c.body.url).toMatch(new RegExp(`^${STRIPE_FAKE.replace(/\./g, '\\.')}/pay/cs_test_`))
  const sessionId = c.body.url.split('/pay/')[1]
  const done = await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${sessionId}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome }) })
  expect(done.status).toBe(200)
  return sessionId as string
}

/** Money tests end with the booking's ledger equal to what the Stripe fake holds for the sessions paid. */
async function expectLedgerMatchesFake(bookingId: number, cookie: string, sessionIds: string[]) {
  const b = await until(() => api(`/api/bookings/${bookingId}`, { cookie }), (r) => r.body.ledger.refundingMinor === 0)
  const held = await (await fetch(`${STRIPE_FAKE}/_fake/holdings?sessions=${sessionIds.join(',')}`)).json()
  expect(b.body.ledger.netMinor).toBe(held.netMinor)
}

describe('trips', () => {
  it('only organisers create trips; bad bodies name the field', async () => {
    expect((await api('/api/trips', { method: 'POST', body: tripBody(), cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const org = await signIn(ORGANISER)
    const bad = await api('/api/trips', { method: 'POST', body: tripBody({ depositMinor: 300_000, currency: 'euro' }), cookie: org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.depositMinor).toMatch(/cannot exceed/)
    expect(bad.body.data.fields.currency).toMatch(/ISO 4217/)
    const wrongSite = await api('/api/trips', { method: 'POST', body: tripBody({ primarySiteId: 999 }), cookie: org })
    expect(wrongSite.status).toBe(400)
    expect(wrongSite.body.data.fields.primarySiteId).toMatch(/not in this workspace/)
  })

  it('drafts are hidden from travellers; published trips show contacts and the eye-safety-relevant type', async () => {
    const org = await signIn(ORGANISER)
    const draft = await api('/api/trips', { method: 'POST', body: tripBody({ title: 'Draft trip' }), cookie: org })
    const trav = await signIn(TRAVELLER)
    expect((await api(`/api/trips/${draft.body.id}`, { cookie: trav })).status).toBe(404)
    expect((await api('/api/trips', { cookie: trav })).body.data.some((t: { title: string }) => t.title === 'Draft trip')).toBe(false)
    const demo = (await api('/api/trips')).body.data.find((t: { title: string }) => t.title.startsWith('Luxor'))
    const d = await api(`/api/trips/${demo.id}`)
    expect(d.body.eclipse.type).toBe('total')
    expect(d.body.eclipse.contacts.map((c: { name: string }) => c.name)).toEqual(['c1', 'c2', 'max', 'c3', 'c4'])
    expect(d.body.eclipse.contacts[1].utcOffset).toBe('+03:00')
  })
})

describe('booking and paying', () => {
  it('holds seats, pays the deposit on the fake, and the signed webhook confirms the booking', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 2 }, cookie: trav })
    expect(hold.status).toBe(201)
    expect(hold.body.status).toBe('held')
    expect(Date.parse(hold.body.holdExpiresAt) - Date.now()).toBeGreaterThan(14 * 60_000)
    const deposit = await pay(hold.body.id, trav)
    const b = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect(b.body).toMatchObject({ status: 'confirmed', paidMinor: 80_000, dueMinor: 320_000 })
    expect(b.body.receipts).toHaveLength(1)

    // Balance, the same way
    const balance = await pay(hold.body.id, trav)
    const full = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.paidMinor === 400_000)
    expect(full.body.dueMinor).toBe(0)

    // Cancel inside the 100 % tier: the whole amount comes back through the SDK's refund call
    const c = await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: trav })
    expect(c.body).toMatchObject({ status: 'cancelled', refundPct: 100, refundMinor: 400_000 })
    const state = await (await fetch(`${STRIPE_FAKE}/_fake/state`)).json()
    expect(state.refunds.filter((r: { metadata: { refundId: string } }) => r.metadata.refundId).reduce((s: number, r: { amount: number }) => s + r.amount, 0)).toBeGreaterThanOrEqual(400_000)
    await expectLedgerMatchesFake(hold.body.id, trav, [deposit, balance])
  })

  it('refunds follow the tier in force: 50 % tier refunds half of what was paid', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER), { cancellationTiers: [{ until: '2000-01-01', refundPct: 100 }, { until: '2099-01-01', refundPct: 50 }] })
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const paid = await pay(hold.body.id, trav)
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    const c = await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: trav })
    expect(c.body).toMatchObject({ refundPct: 50, refundMinor: 20_000 })
    await expectLedgerMatchesFake(hold.body.id, trav, [paid])
  })

  it('a bad signature gets 400 and changes nothing; a replayed event changes nothing', async () => {
    const r = await api('/api/stripe/webhook', { method: 'POST', raw: JSON.stringify({ id: 'evt_forged', type: 'payment_intent.succeeded', data: { object: { id: 'pi_x', metadata: { paymentId: '1' } } } }), headers: { 'content-type': 'application/json', 'stripe-signature': 't=1,v1=deadbeef' } })
    expect(r.status).toBe(400)
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    await pay(hold.body.id, trav)
    const b1 = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (x) => x.body.status === 'confirmed')
    const state = await (await fetch(`${STRIPE_FAKE}/_fake/state`)).json()
    // Each redelivery returns once the app has answered the webhook, so the replays are all handled here.
    for (const e of state.events.slice(-4)) await fetch(`${STRIPE_FAKE}/_fake/events/${e.id}/redeliver`, { method: 'POST' })
    const b2 = await api(`/api/bookings/${hold.body.id}`, { cookie: trav })
    expect(b2.body.paidMinor).toBe(b1.body.paidMinor)
    expect(b2.body.receipts).toHaveLength(1)
    expect(b2.body.ledger.entries).toHaveLength(1)
  })

  it('40 travellers racing for 10 seats: exactly 10 seats held, the rest told sold out', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org, { seats: 10, minGroupSize: 1 })
    // Forty confirmed accounts (invited, so their addresses count as confirmed), one hold attempt each, all at once.
    const cookies = await Promise.all(Array.from({ length: 40 }, async (_, i) => {
      await inviteAndChoosePassword(org, { name: `Racer ${i}`, email: `racer${i}-${tripId}@umbrafield.test`, role: 'guide' }, 'racer-password')
      return signIn(`racer${i}-${tripId}@umbrafield.test`, 'racer-password', `203.0.113.${i + 1}`)
    }))
    const results = await Promise.all(cookies.map((cookie) => api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })))
    const ok = results.filter((r) => r.status === 201)
    const refused = results.filter((r) => r.status === 409)
    expect(ok).toHaveLength(10)
    expect(refused).toHaveLength(30)
    for (const r of refused) { expect(r.body.code).toBe('sold_out'); expect(r.body.message).toMatch(/sold out/) }
    const table = await api(`/api/trips/${tripId}/bookings`, { cookie: org })
    expect(table.body.data.filter((b: { status: string }) => b.status === 'held').reduce((s: number, b: { seats: number }) => s + b.seats, 0)).toBe(10)
    expect(table.body.trip.seatsLeft).toBe(0)
    // A full trip opens a waitlist, one entry per traveller
    const waiting = await signIn(TRAVELLER)
    const w = await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: waiting })
    expect(w.status).toBe(201)
    expect(w.body).toMatchObject({ status: 'waiting', position: 1 })
    const again = await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: waiting })
    expect(again.status).toBe(409)
    expect(again.body.data.code).toBe('waitlist_exists')
    // A freed seat is offered to the next person in line
    const holder = cookies[results.findIndex((r) => r.status === 201)]!
    const one = ok[0]!.body
    await api(`/api/bookings/${one.id}/cancel`, { method: 'POST', cookie: holder })
    const after = await api(`/api/trips/${tripId}/bookings`, { cookie: org })
    expect(after.body.waitlist[0].status).toBe('offered')
    // …and others cannot take it meanwhile, while the offered traveller can
    const other = cookies[results.findIndex((r) => r.status === 409)]!
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: other })).status).toBe(409)
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: waiting })).status).toBe(201)
  }, 150_000) // forty invitations go out by e-mail, one SMTP delivery after another

  it('a crash between payment and webhook loses nothing: reconciliation completes it, late webhooks do not double-count', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const events = async () => ((await (await fetch(`${STRIPE_FAKE}/_fake/state`)).json()).events as Array<{ id: string; delivered: boolean }>)
    const before = new Set((await events()).map((e) => e.id))
    await fetch(`${STRIPE_FAKE}/_fake/webhooks/pause`, { method: 'POST' })
    let session: string
    let held: string[] = []
    try {
      session = await pay(hold.body.id, trav)
      expect((await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.status).toBe('held')
      // Once the checkout has been pending longer than the reconciliation delay, housekeeping asks Stripe.
      await advanceClock(RECONCILE_AFTER_MS + 1000)
      const b = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed', 10_000)
      expect(b.body).toMatchObject({ status: 'confirmed', paidMinor: 40_000 })
      // This payment's events, held back by the pause.
      held = (await events()).filter((e) => !before.has(e.id) && !e.delivered).map((e) => e.id)
      expect(held.length).toBeGreaterThanOrEqual(2)
    } finally {
      await fetch(`${STRIPE_FAKE}/_fake/webhooks/resume`, { method: 'POST' })
    }
    // The late webhooks arrive (the fake marks each one the app accepted), and count for nothing.
    const delivered = await until(events, (list) => held.every((id) => list.find((e) => e.id === id)?.delivered))
    expect(held.every((id) => delivered.find((e) => e.id === id)?.delivered)).toBe(true)
    expect((await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.paidMinor).toBe(40_000)
    await expectLedgerMatchesFake(hold.body.id, trav, [session])
  })
})

describe('who sees what', () => {
  it('a traveller sees and cancels only their own bookings', async () => {
    const a = await signIn(TRAVELLER)
    const b = await signIn(TRAVELLER2)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: a })
    expect((await api(`/api/bookings/${hold.body.id}`, { cookie: b })).status).toBe(404)
    expect((await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: b })).status).toBe(404)
    expect((await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: b })).status).toBe(404)
    expect((await api('/api/bookings', { cookie: b })).body.data.some((x: { id: number }) => x.id === hold.body.id)).toBe(false)
    expect((await api(`/api/trips/${tripId}/bookings`, { cookie: a })).status).toBe(403)
  })

  it('a guide sees the participant list of their trip, with no payments', async () => {
    const demo = (await api('/api/trips')).body.data.find((t: { title: string }) => t.title.startsWith('Luxor'))
    const r = await api(`/api/trips/${demo.id}/participants`, { cookie: await signIn(GUIDE) })
    expect(r.status).toBe(200)
    expect(r.body.data[0]).toEqual({ name: 'Samir Okafor (demo traveller)', seats: 2 })
    expect(JSON.stringify(r.body)).not.toMatch(/Minor|paid|email/i)
    expect((await api(`/api/trips/${demo.id}/bookings`, { cookie: await signIn(GUIDE) })).status).toBe(403)
  })

  it('an organiser refunds manually with a reason, written to the audit log; CSV export lists bookings', async () => {
    const trav = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org)
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const paid = await pay(hold.body.id, trav)
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect((await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 10_000 }, cookie: org })).status).toBe(400)
    const tooMuch = await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 999_999, reason: 'too much' }, cookie: org })
    expect(tooMuch.status).toBe(400)
    expect(tooMuch.body.data.fields.amountMinor).toMatch(/At most 40000/)
    const ok = await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 10_000, reason: 'bus broke down' }, cookie: org })
    expect(ok.body).toEqual({ refundMinor: 10_000, sent: true })
    expect((await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.refundedMinor).toBe(10_000)
    await expectLedgerMatchesFake(hold.body.id, trav, [paid])
    const csv = await api(`/api/trips/${tripId}/bookings.csv`, { cookie: org })
    // Amounts in major units beside the currency (see tests/server/messages.spec.ts).
    expect(csv.body.split(/\r?\n/)[0]).toBe('booking_id,name,email,seats,status,currency,price,paid,refunded,due_now,balance,created_at')
  })
})
