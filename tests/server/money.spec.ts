import Stripe from 'stripe'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { advanceClock, api, ORGANISER, signIn, STRIPE_FAKE, TEST_PORTS, TRAVELLER, TRAVELLER2, until, useApp } from './app'

// Money against the local Stripe fake. Holds last their usual 15 minutes and lapse when the test
// moves the app's clock; refunds are retried after 0.5 s, 1 s, 2 s… of app time
// (UMBRAFIELD_REFUND_RETRY_MS) by housekeeping every second.
const HOLD_MINUTES = 15
const { dbTarget } = await useApp({ NUXT_HOLD_MINUTES: String(HOLD_MINUTES), UMBRAFIELD_RECONCILE_AFTER_MS: '1500' })
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

const WEBHOOK_SECRET = 'whsec_umbrafield_local_fake'
const fake = (path: string, body?: unknown) => fetch(`${STRIPE_FAKE}${path}`, body === undefined ? {} : { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) }).then((r) => r.json())

async function newTrip(org: string, over: Record<string, unknown> = {}) {
  const r = await api('/api/trips', { method: 'POST', cookie: org, body: {
    workspaceId: 1, primarySiteId: 4, title: 'Money trip', startDate: '2027-07-31', endDate: '2027-08-03', seats: 5, priceMinor: 200_000, depositMinor: 40_000,
    currency: 'eur', balanceDueDate: '2027-05-01', cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }],
    meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' }, ...over,
  } })
  expect(r.status).toBe(201)
  await api(`/api/trips/${r.body.id}/publish`, { method: 'POST', cookie: org })
  return r.body.id as number
}

const sessionOf = (url: string) => url.split('/pay/')[1]!

/** A one-seat booking whose deposit the traveller has paid on the fake: returns it and its checkout. */
async function confirmedBooking(trav: string, org: string) {
  const tripId = await newTrip(org)
  const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
  const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
  await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })
  await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
  return { hold, c }
}

/**
 * Every money test ends here: the booking's ledger equals what the fake holds for the checkout
 * sessions the test opened for it, and nothing is still owed back.
 */
async function expectLedgerMatchesStripe(bookingId: number, cookie: string, wantNetMinor: number, sessionUrls: string[]) {
  const b = await until(() => api(`/api/bookings/${bookingId}`, { cookie }), (r) => r.body.ledger.refundingMinor === 0)
  const held = await fake(`/_fake/holdings?sessions=${sessionUrls.map(sessionOf).join(',')}`)
  expect(b.body.ledger.refundingMinor).toBe(0)
  expect(b.body.ledger.netMinor).toBe(held.netMinor)
  expect(b.body.ledger.netMinor).toBe(wantNetMinor)
  return b.body
}

describe('money that adds up', () => {
  it('two checkouts, both paid: exactly the deposit stays; the second payment is refunded and shows in the ledger', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 2 }, cookie: trav })
    const a = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    // A second tab gets the same open session, not a second one.
    const again = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    expect(again.body.url).toBe(a.body.url)
    // The traveller changes the seat count: the old session is expired and a new one made…
    await api(`/api/bookings/${hold.body.id}`, { method: 'PATCH', body: { seats: 1 }, cookie: trav })
    const b = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    expect(b.body.url).not.toBe(a.body.url)
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(a.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(false) // expired: cannot be paid
    // …but a payment already in flight on the old one still lands, after the new one is paid.
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(b.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(true)
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(a.body.url)}/complete`, { outcome: 'succeeded', force: true })).ok).toBe(true)
    // Its webhook arrives when it arrives: wait for the second payment to reach the ledger.
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.ledger.entries.filter((e: { type: string }) => e.type === 'payment').length === 2)
    const view = await expectLedgerMatchesStripe(hold.body.id, trav, 40_000, [a.body.url, b.body.url])
    expect(view.paidMinor).toBe(40_000)
    expect(view.status).toBe('confirmed')
    const refunds = view.ledger.entries.filter((e: { type: string }) => e.type === 'refund')
    expect(refunds).toHaveLength(1)
    expect(refunds[0]).toMatchObject({ amountMinor: -80_000, status: 'succeeded' })
    expect(refunds[0].kind).toMatch(/automatic: a second payment of the deposit/)
  })

  it('a booking cancelled with its payment page open, then paid, ends with net 0', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    expect((await api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: trav })).body.status).toBe('cancelled')
    // Cancelling expired the session: it cannot be paid any more…
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(false)
    // …and a payment that was already in flight is refunded in full.
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded', force: true })).ok).toBe(true)
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.ledger.entries.length === 2)
    const view = await expectLedgerMatchesStripe(hold.body.id, trav, 0, [c.body.url])
    expect(view.status).toBe('cancelled')
    expect(view.paidMinor).toBe(0)
  })

  it('a payment after the hold lapsed and the seats were resold is refunded, and the other traveller keeps the seat', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await newTrip(org, { seats: 1 })
    const late = await signIn(TRAVELLER)
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: late })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: late })
    // The hold lapses: the app's clock moves past its end, and housekeeping lets the seat go.
    await advanceClock(HOLD_MINUTES * 60_000 + 1000)
    const other = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(TRAVELLER2) })
    expect(other.status).toBe(201)
    expect((await fake(`/_fake/checkout/sessions/${sessionOf(c.body.url)}/complete`, { outcome: 'succeeded' })).ok).toBe(true)
    const view = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: late }), (r) => r.body.status === 'cancelled')
    expect(view.body.cancelReason).toMatch(/hold lapsed/)
    await expectLedgerMatchesStripe(hold.body.id, late, 0, [c.body.url])
    const table = await api(`/api/trips/${tripId}/bookings`, { cookie: org })
    expect(table.body.data.find((b: { id: number }) => b.id === other.body.id).status).toBe('held')
  })

  it('a refund Stripe rejects is not counted, is retried with backoff, and counts once it succeeds; the organiser hears when it keeps failing', async () => {
    const trav = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    const { hold, c } = await confirmedBooking(trav, org)
    await fake('/_fake/refunds/fail', { count: 3 })
    const r = await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 10_000, reason: 'coach cancelled' }, cookie: org })
    expect(r.body).toEqual({ refundMinor: 10_000, sent: false })
    const failed = await api(`/api/bookings/${hold.body.id}`, { cookie: trav })
    expect(failed.body.refundedMinor).toBe(0)
    expect(failed.body.ledger.entries.find((e: { type: string }) => e.type === 'refund').status).toBe('failed')
    const outbox = async () => (await api('/api/outbox', { cookie: org })).body.data as Array<{ kind: string; subject: string }>
    expect((await outbox()).some((m) => m.kind === 'refund-issued' && m.subject.includes('100.00'))).toBe(false)
    // Housekeeping retries: two more failures (the organiser is told after the third), then success.
    const done = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (x) => x.body.refundedMinor === 10_000, 15_000)
    expect(done.body.refundedMinor).toBe(10_000)
    expect((await outbox()).some((m) => m.kind === 'refund-stuck')).toBe(true)
    expect((await outbox()).some((m) => m.kind === 'refund-issued')).toBe(true)
    await expectLedgerMatchesStripe(hold.body.id, trav, 30_000, [c.body.url])
  })

  it('a refund made at Stripe whose reply was lost is found again on the retry: given back once, counted once', async () => {
    const trav = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    const { hold, c } = await confirmedBooking(trav, org)
    const intent = (await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body.receipts[0].reference as string
    const madeAtStripe = async () => ((await fake('/_fake/state')).refunds as Array<{ id: string; payment_intent: string; amount: number }>).filter((r) => r.payment_intent === intent)
    // Stripe makes the refund, but the connection drops before the app hears back: on the first try
    // and on every repeat under the same idempotency key (the SDK's network retries, or a housekeeping
    // tick trying the same new row alongside this request).
    await fake('/_fake/refunds/drop-reply', { count: 1 })
    try {
      const r = await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 10_000, reason: 'lost reply' }, cookie: org })
      expect(r.body.refundMinor).toBe(10_000)
      // Usually not heard of, so not counted yet: the ledger shows it failed, to be retried. (A housekeeping
      // tick may have tried the same row first and met the lost reply; then this request's own try was the retry.)
      if (!r.body.sent) {
        const unheard = (await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body
        expect(unheard.refundedMinor).toBe(0)
        expect(unheard.ledger.entries.find((e: { type: string }) => e.type === 'refund').status).toBe('failed')
      }
    } finally {
      await fake('/_fake/refunds/drop-reply', { count: 0 })
    }
    const made = await madeAtStripe()
    expect(made.map((x) => x.amount)).toEqual([10_000])
    // The retry is due after the backoff: move past it. It asks Stripe first, finds the refund, and makes no second one.
    await advanceClock(60_000)
    const done = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (x) => x.body.refundedMinor === 10_000)
    expect(done.body.refundedMinor).toBe(10_000)
    expect((await madeAtStripe()).map((x) => x.id)).toEqual([made[0]!.id])
    expect(done.body.ledger.entries.find((e: { type: string }) => e.type === 'refund').reference).toBe(made[0]!.id)
    // Attempts still in their network retries under the lost key (each try is counted by the fake)
    // fail late, after the refund was found and counted: wait until they stop, then it must still count once.
    let tries = -1, quietSince = Date.now()
    await until(async () => (await fake('/_fake/state')).lostReplies as number, (n) => {
      if (n !== tries) { tries = n; quietSince = Date.now() }
      return Date.now() - quietSince > 3000
    }, 20_000)
    const settled = (await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body
    expect(settled.refundedMinor).toBe(10_000)
    // It took a second attempt: the first one lost the reply.
    const row = await db.selectFrom('refunds').select(['status', 'attempts', 'stripe_refund_id']).where('booking_id', '=', hold.body.id).executeTakeFirstOrThrow()
    expect(row.status).toBe('succeeded')
    expect(row.attempts).toBeGreaterThanOrEqual(2)
    expect(row.stripe_refund_id).toBe(made[0]!.id)
    await expectLedgerMatchesStripe(hold.body.id, trav, 30_000, [c.body.url])
  })

  it('a refund that keeps failing shows in the money check, and the organiser is told exactly once', async () => {
    const trav = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    const { hold, c } = await confirmedBooking(trav, org)
    // The catcher is shared by every test file's app (each with its own booking numbers): count what arrives from here on.
    const caught = async () => ((await (await fetch(`http://127.0.0.1:${TEST_PORTS.fakes.MAIL_FAKE_WEB_PORT}/api/email`)).json()) as Array<{ subject: string }>)
      .filter((m) => m.subject === `Refund keeps failing: booking #${hold.body.id}`).length
    const caughtBefore = await caught()
    const failing = async () => {
      const report = await api('/api/reconciliation', { cookie: org })
      expect(report.status).toBe(200)
      return (report.body.failingRefunds as Array<{ id: number; bookingId: number; amountMinor: number; attempts: number; error: string; nextAttemptAt: string }>).find((f) => f.bookingId === hold.body.id)
    }
    const stuckMails = async () => ((await api('/api/outbox', { cookie: org })).body.data as Array<{ kind: string; bookingId: number | null; status: string }>)
      .filter((m) => m.kind === 'refund-stuck' && m.bookingId === hold.body.id)
    await fake('/_fake/refunds/fail', { count: 1000 })
    try {
      const r = await api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 5_000, reason: 'keeps failing' }, cookie: org })
      expect(r.body).toEqual({ refundMinor: 5_000, sent: false })
      // Retry rounds: each time the clock passes the next attempt, housekeeping tries again, and fails again.
      for (let attempts = 2; attempts <= 6; attempts++) {
        const before = (await failing())!
        const now = await advanceClock(0)
        await advanceClock(Math.max(0, Date.parse(before.nextAttemptAt) - Date.parse(now)) + 1000)
        const after = await until(failing, (f) => (f?.attempts ?? 0) >= attempts)
        expect(after!.attempts).toBeGreaterThanOrEqual(attempts)
      }
      const shown = (await failing())!
      expect(shown).toMatchObject({ amountMinor: 5_000, error: expect.stringMatching(/refund failed/) })
      expect(shown.attempts).toBeGreaterThanOrEqual(6)
      // The ledger comparison finds no difference: a refund that never happened is on neither side.
      await api('/api/reconciliation/run', { method: 'POST', cookie: org })
      const diffs = (await api('/api/reconciliation', { cookie: org })).body.data as Array<{ bookingId: number; kind: string }>
      expect(diffs.filter((d) => d.bookingId === hold.body.id)).toEqual([])
      // One alert for the organiser (the trip's creator), however many rounds failed.
      expect(await stuckMails()).toHaveLength(1)
      // …and exactly one reaches the mail catcher.
      await until(stuckMails, (m) => m[0]?.status === 'sent')
      expect(await caught() - caughtBefore).toBe(1)
    } finally {
      await fake('/_fake/refunds/fail', { count: 0 })
    }
    // Stripe recovers: the next retry goes through, the money check lists it no more, and no second alert goes out.
    const last = (await failing())!
    await advanceClock(Math.max(0, Date.parse(last.nextAttemptAt) - Date.parse(await advanceClock(0))) + 1000)
    const done = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (x) => x.body.refundedMinor === 5_000)
    expect(done.body.refundedMinor).toBe(5_000)
    expect(await failing()).toBeUndefined()
    expect(await stuckMails()).toHaveLength(1)
    expect(await caught() - caughtBefore).toBe(1)
    await expectLedgerMatchesStripe(hold.body.id, trav, 35_000, [c.body.url])
  })

  it('a cancel and a manual refund racing never refund more than was paid', async () => {
    const trav = await signIn(TRAVELLER)
    const org = await signIn(ORGANISER)
    const { hold, c } = await confirmedBooking(trav, org)
    const [cancel, manual] = await Promise.all([
      api(`/api/bookings/${hold.body.id}/cancel`, { method: 'POST', cookie: trav }),
      api(`/api/bookings/${hold.body.id}/refund`, { method: 'POST', body: { amountMinor: 30_000, reason: 'goodwill' }, cookie: org }),
    ])
    expect(cancel.status).toBe(200)
    const refunded = (cancel.body.refundMinor as number) + (manual.status === 200 ? 30_000 : 0)
    expect(refunded).toBe(40_000)
    if (manual.status !== 200) expect(manual.status).toBe(400)
    await expectLedgerMatchesStripe(hold.body.id, trav, 0, [c.body.url])
  })

  it('webhooks with a stale timestamp, no signature or the wrong secret get 400 and change nothing', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    const before = (await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body
    const payload = JSON.stringify({
      id: `evt_forged_${hold.body.id}`, object: 'event', type: 'checkout.session.completed',
      data: { object: { id: sessionOf(c.body.url), payment_status: 'paid', payment_intent: 'pi_forged', metadata: { bookingId: String(hold.body.id), paymentId: String(c.body.paymentId) } } },
    })
    const headers = (sig?: string) => ({ 'content-type': 'application/json', ...(sig ? { 'stripe-signature': sig } : {}) })
    const stale = Stripe.webhooks.generateTestHeaderString({ payload, secret: WEBHOOK_SECRET, timestamp: Math.floor(Date.now() / 1000) - 3600 })
    const wrong = Stripe.webhooks.generateTestHeaderString({ payload, secret: 'whsec_not_ours' })
    for (const sig of [stale, undefined, wrong]) {
      const r = await api('/api/stripe/webhook', { method: 'POST', raw: payload, headers: headers(sig) })
      expect(r.status).toBe(400)
    }
    const after = (await api(`/api/bookings/${hold.body.id}`, { cookie: trav })).body
    expect(after.status).toBe('held')
    expect(after.paidMinor).toBe(before.paidMinor)
    expect(after.ledger).toEqual(before.ledger)
    expect(after.payments).toEqual(before.payments)
    // The same event, correctly signed, is accepted: the check is the signature, not the body.
    const good = Stripe.webhooks.generateTestHeaderString({ payload, secret: WEBHOOK_SECRET })
    expect((await api('/api/stripe/webhook', { method: 'POST', raw: payload, headers: headers(good) })).status).toBe(200)
  })

  it('checkout.session.expired marks the payment ended, and the next checkout is a new session', async () => {
    const trav = await signIn(TRAVELLER)
    const tripId = await newTrip(await signIn(ORGANISER))
    const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    // Expire it at the fake, as Stripe does after its time: the fake sends checkout.session.expired.
    await fetch(`${STRIPE_FAKE}/v1/checkout/sessions/${sessionOf(c.body.url)}/expire`, { method: 'POST', headers: { authorization: 'Bearer sk_test_umbrafield' } })
    const ended = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.payments[0]?.status === 'failed')
    expect(ended.body.payments[0].status).toBe('failed')
    const next = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    expect(next.body.url).not.toBe(c.body.url)
    await fake(`/_fake/checkout/sessions/${sessionOf(next.body.url)}/complete`, { outcome: 'succeeded' })
    await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    await expectLedgerMatchesStripe(hold.body.id, trav, 40_000, [c.body.url, next.body.url])
  })

  it('the reconciliation page lists no differences after all of the above; deleting a site a trip uses is a 409 naming the trip', async () => {
    const org = await signIn(ORGANISER)
    const run = await api('/api/reconciliation/run', { method: 'POST', cookie: org })
    expect(run.status).toBe(200)
    expect(run.body.checked).toBeGreaterThanOrEqual(6)
    const report = await api('/api/reconciliation', { cookie: org })
    expect(report.body.data.filter((d: { kind: string }) => d.kind === 'difference')).toEqual([])
    expect(report.body.failingRefunds).toEqual([])
    expect((await api('/api/reconciliation', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const del = await api('/api/sites/4', { method: 'DELETE', cookie: org })
    expect(del.status).toBe(409)
    expect(del.body.data.code).toBe('site_in_use')
    expect(del.body.data.trip).toMatch(/Luxor totality week|Money trip/)
    expect(del.body.message).toContain(del.body.data.trip)
  })
})
