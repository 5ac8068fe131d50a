import { expect } from 'vitest'
import { api, inviteAndChoosePassword, signIn, STRIPE_FAKE, until } from './app'

/**
 * Fixtures of the alerts, messages and search tests: accounts of their own (invited, so confirmed),
 * trips of their own, and deposits paid on the Stripe fake.
 */
export async function freshAccount(org: string, name: string, role: 'traveller' | 'organiser' = 'traveller') {
  const email = `${name.replace(/[^a-z]/gi, '').toLowerCase() || 'x'}-${Math.random().toString(36).slice(2, 8)}@umbrafield.test`
  const password = 'ops-test-password-0'
  const inv = await inviteAndChoosePassword(org, { name, email, role: role === 'organiser' ? 'organiser' : 'guide' }, password)
  const id = inv.body.user.id as number
  // Invitations are for staff; made a traveller, the account may hold seats.
  if (role === 'traveller') expect((await api(`/api/users/${id}`, { method: 'PATCH', body: { role: 'traveller' }, cookie: org })).status).toBe(200)
  return { email, id, name, cookie: await signIn(email, password) }
}

export async function publishedTrip(org: string, over: Record<string, unknown> = {}) {
  const r = await api('/api/trips', { method: 'POST', cookie: org, body: {
    workspaceId: 1, primarySiteId: 4, title: `Operations trip ${Math.random().toString(36).slice(2, 6)}`, startDate: '2027-07-31', endDate: '2027-08-03', seats: 10,
    priceMinor: 200_000, depositMinor: 40_000, currency: 'eur', balanceDueDate: '2027-05-01', cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }],
    meetingPoint: { name: 'Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' }, ...over,
  } })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  expect((await api(`/api/trips/${r.body.id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
  return r.body.id as number
}

export async function hold(tripId: number, cookie: string, seats = 1): Promise<number> {
  const r = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body.id
}

/** Pays what is due now on the fake (the deposit of a hold, the balance of a confirmed booking) and waits for it to count. */
export async function payDue(bookingId: number, cookie: string) {
  const before = (await api(`/api/bookings/${bookingId}`, { cookie })).body
  const c = await api(`/api/bookings/${bookingId}/checkout`, { method: 'POST', cookie })
  expect(c.status, JSON.stringify(c.body)).toBe(200)
  const done = await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${c.body.url.split('/pay/')[1]}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome: 'succeeded' }) })
  expect(done.status).toBe(200)
  const after = await until(() => api(`/api/bookings/${bookingId}`, { cookie }), (r) => r.body.paidMinor > before.paidMinor)
  expect(after.body.paidMinor).toBeGreaterThan(before.paidMinor)
  return after.body
}
