import { describe, expect, it } from 'vitest'
import { advanceClock, api, ORGANISER, signIn, STRIPE_FAKE, TRAVELLER, until, useApp } from './app'

// Rules that follow the business date (server/services/clock.ts businessDate): with the app's clock
// moved forward, they see the new date. No fixed date here, so the date is the moved clock's.
await useApp()

const BALANCE_DUE = '2027-05-01'

describe('the business date follows the clock', () => {
  it('a balance reminder is queued once the clock comes within 30 days of the due date', async () => {
    const org = await signIn(ORGANISER)
    const trav = await signIn(TRAVELLER)
    const trip = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: 1, primarySiteId: 4, title: 'Reminder trip', startDate: '2027-07-31', endDate: '2027-08-03', seats: 4, priceMinor: 100_000, depositMinor: 20_000,
      currency: 'eur', balanceDueDate: BALANCE_DUE, meetingPoint: { name: 'Hotel', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
    } })
    expect(trip.status).toBe(201)
    await api(`/api/trips/${trip.body.id}/publish`, { method: 'POST', cookie: org })
    const hold = await api(`/api/trips/${trip.body.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${c.body.url.split('/pay/')[1]}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome: 'succeeded' }) })
    const confirmed = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie: trav }), (r) => r.body.status === 'confirmed')
    expect(confirmed.body.balanceMinor).toBe(80_000)
    const reminders = async () => ((await api('/api/outbox', { cookie: await signIn(ORGANISER) })).body.data as Array<{ kind: string; bookingId: number | null }>)
      .filter((m) => m.kind === 'balance-reminder' && m.bookingId === hold.body.id)
    // Months before the due date: nothing to remind of.
    const now = Date.parse(await advanceClock(0))
    expect(now).toBeLessThan(Date.parse(`${BALANCE_DUE}T00:00:00Z`) - 60 * 86_400_000)
    expect(await reminders()).toEqual([])
    // Three weeks before it (the 30-day reminder's range; the mail worker looks once an hour of app time).
    await advanceClock(Date.parse('2027-04-10T12:00:00Z') - now)
    const queued = await until(reminders, (m) => m.length > 0, 15_000)
    expect(queued).toHaveLength(1)
  })

  it('an eclipse leaves the upcoming list once the clock passes its day', async () => {
    const ids = async (q = '?upcoming=1') => ((await api(`/api/eclipses${q}`)).body.data as Array<{ id: string }>).map((e) => e.id)
    expect(await ids()).toContain('2027-08-02')
    const now = Date.parse(await advanceClock(0))
    await advanceClock(Math.max(0, Date.parse('2027-08-03T12:00:00Z') - now))
    const after = await ids()
    expect(after).not.toContain('2027-08-02')
    expect(after[0]! > '2027-08-02').toBe(true)
    // Still in the catalogue, only no longer upcoming.
    expect(await ids('')).toContain('2027-08-02')
  })
})
