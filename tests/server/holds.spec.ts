import { describe, expect, it } from 'vitest'
import { advanceClock, api, ORGANISER, signIn, STRIPE_FAKE, TRAVELLER, TRAVELLER2, useApp } from './app'

// Holds of 5 minutes, lapsed by moving the app's clock; at most 3 hold requests per account in 10 minutes.
const HOLD_MINUTES = 5
await useApp({ NUXT_HOLD_MINUTES: String(HOLD_MINUTES), UMBRAFIELD_HOLD_LIMIT: '3' })

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
