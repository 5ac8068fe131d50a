import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { DEMO_TRIP_TITLE } from '../../server/database/seed/demo'
import { api, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TEST_DB, TRAVELLER, TRAVELLER2, useApp } from './app'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

/** The demo's planning workspace and three of its sites, read from the demo trip. */
const fx = { ws: 0, luxorSite: 0, backupA: 0, backupB: 0, org: '', trav: '', trav2: '', guide: '', guideId: 0, other: '', otherId: 0, travId: 0 }

beforeAll(async () => {
  fx.org = await signIn(ORGANISER)
  fx.trav = await signIn(TRAVELLER)
  fx.trav2 = await signIn(TRAVELLER2)
  fx.guide = await signIn(GUIDE)
  const demo = await db.selectFrom('trips').select(['id', 'workspace_id', 'primary_site_id']).where('title', '=', DEMO_TRIP_TITLE).executeTakeFirstOrThrow()
  fx.ws = demo.workspace_id
  fx.luxorSite = demo.primary_site_id
  const backups = await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', demo.id).orderBy('rank').execute()
  fx.backupA = backups[0]!.site_id
  fx.backupB = backups[1]!.site_id
  fx.guideId = (await db.selectFrom('users').select('id').where('email', '=', GUIDE).executeTakeFirstOrThrow()).id
  fx.travId = (await db.selectFrom('users').select('id').where('email', '=', TRAVELLER).executeTakeFirstOrThrow()).id
  const inv = await inviteAndChoosePassword(fx.org, { name: 'Unassigned Guide (test)', email: 'trip-ops-other@umbrafield.test', role: 'guide' }, 'trip-ops-other-pw')
  fx.otherId = inv.body.user.id
  fx.other = await signIn('trip-ops-other@umbrafield.test', 'trip-ops-other-pw')
}, 120_000)

const tripBody = (over: Record<string, unknown> = {}) => ({
  workspaceId: fx.ws, primarySiteId: fx.luxorSite, backupSiteIds: [fx.backupA], title: 'Trip ops test trip', startDate: '2027-07-31', endDate: '2027-08-03',
  seats: 10, priceMinor: 200_000, depositMinor: 40_000, currency: 'EUR', balanceDueDate: '2027-05-01',
  cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }], minGroupSize: 2,
  meetingPoint: { name: 'Old hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' }, ...over,
})

async function newTrip(over: Record<string, unknown> = {}, publish = true) {
  const r = await api('/api/trips', { method: 'POST', body: tripBody(over), cookie: fx.org })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  if (publish) expect((await api(`/api/trips/${r.body.id}/publish`, { method: 'POST', cookie: fx.org })).status).toBe(200)
  return r.body.id as number
}

async function hold(tripId: number, cookie: string, seats: number) {
  const r = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  return r.body.id as number
}

const patch = (id: number, body: unknown, cookie = fx.org) => api(`/api/trips/${id}`, { method: 'PATCH', body, cookie })

/** The "trip changed" e-mails of a trip, read from the outbox table (written in the edit's transaction). */
const changeMails = (tripId: number) => db.selectFrom('outbox').select(['to_email', 'subject', 'text', 'html', 'booking_id']).where('trip_id', '=', tripId).where('kind', '=', 'trip-changed').orderBy('id').execute()

describe(`running a trip after publishing (${TEST_DB})`, () => {
  it('an organiser edits every field of a published trip; each change is audited with its old and new value', async () => {
    const id = await newTrip({ title: 'Edit me (test)' })
    const body = {
      title: 'Edited expedition (test)', description: 'A new description.', startDate: '2028-07-20', endDate: '2028-07-24',
      priceMinor: 310_000, depositMinor: 60_000, seats: 14, balanceDueDate: '2028-04-01',
      meetingPoint: { name: 'New quay (test)', lat: 25.7, lon: 32.65, time: '2028-07-22T05:00:00+02:00' },
      // Seven tiers with the organiser's own percentages: more than the old fixed limit of six.
      cancellationTiers: [
        { until: '2027-10-01', refundPct: 95 }, { until: '2027-12-01', refundPct: 85 }, { until: '2028-01-15', refundPct: 70 }, { until: '2028-03-01', refundPct: 55 },
        { until: '2028-04-15', refundPct: 40 }, { until: '2028-06-01', refundPct: 25 }, { until: '2028-07-01', refundPct: 10 },
      ],
      primarySiteId: fx.backupA, backupSiteIds: [fx.luxorSite, fx.backupB],
    }
    const r = await patch(id, body)
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body.changed.sort()).toEqual(['backupSiteIds', 'balanceDueDate', 'cancellationTiers', 'depositMinor', 'description', 'endDate', 'meetingPoint', 'priceMinor', 'primarySiteId', 'seats', 'startDate', 'title'])
    const t = (await api(`/api/trips/${id}`, { cookie: fx.org })).body
    expect(t).toMatchObject({ title: body.title, description: body.description, startDate: '2028-07-20', endDate: '2028-07-24', priceMinor: 310_000, depositMinor: 60_000, seats: 14, balanceDueDate: '2028-04-01', cancellationTiers: body.cancellationTiers })
    expect(t.meetingPoint).toMatchObject({ name: 'New quay (test)', timeUtc: '2028-07-22T03:00:00.000Z' })
    expect(t.site.id).toBe(fx.backupA)
    const backups = await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', id).orderBy('rank').execute()
    expect(backups.map((b) => b.site_id)).toEqual([fx.luxorSite, fx.backupB])

    const rows = await db.selectFrom('audit_log').select(['action', 'detail', 'actor_user_id']).where('action', '=', 'trip_update').execute()
    const mine = rows.map((a) => JSON.parse(a.detail!)).filter((d) => d.tripId === id)
    expect(mine).toHaveLength(1)
    expect(mine[0].changes.title).toEqual({ label: 'Title', from: 'Edit me (test)', to: 'Edited expedition (test)' })
    expect(mine[0].changes.priceMinor).toMatchObject({ from: '200000', to: '310000' })
    expect(mine[0].changes.seats).toMatchObject({ from: '10', to: '14' })
    expect(mine[0].changes.startDate).toMatchObject({ from: '2027-07-31', to: '2028-07-20' })
    expect(mine[0].changes.meetingPoint.from).toContain('Old hotel (test)')
    expect(mine[0].changes.meetingPoint.to).toContain('New quay (test)')

    // The same edit again changes nothing and audits nothing.
    expect((await patch(id, body)).body.changed).toEqual([])
    expect((await db.selectFrom('audit_log').select('detail').where('action', '=', 'trip_update').execute()).filter((a) => JSON.parse(a.detail!).tripId === id)).toHaveLength(1)
  })

  it('refuses bad edits with a 400 naming the field, and only organisers edit', async () => {
    const id = await newTrip()
    const deposit = await patch(id, { depositMinor: 250_000 })
    expect(deposit.status).toBe(400)
    expect(deposit.body.data.fields.depositMinor).toMatch(/cannot exceed the price/)
    const dates = await patch(id, { endDate: '2027-07-01' })
    expect(dates.status).toBe(400)
    expect(dates.body.data.fields.endDate).toMatch(/cannot end before it starts/)
    const order = await patch(id, { cancellationTiers: [{ until: '2028-01-01', refundPct: 50 }, { until: '2027-01-01', refundPct: 90 }] })
    expect(order.status).toBe(400)
    expect(JSON.stringify(order.body.data.fields)).toMatch(/date order/)
    const unknown = await patch(id, { currency: 'usd' })
    expect(unknown.status).toBe(400)
    const foreign = await patch(id, { primarySiteId: 999_999 })
    expect(foreign.status).toBe(400)
    expect(foreign.body.data.fields.primarySiteId).toMatch(/not in this trip's planning workspace/)
    expect((await patch(id, { title: 'Guide edit' }, fx.guide)).status).toBe(403)
    expect((await patch(id, { title: 'Traveller edit' }, fx.trav)).status).toBe(403)
    expect((await patch(999_999, { title: 'Nobody' })).status).toBe(404)
    expect((await api(`/api/trips/${id}`, { cookie: fx.org })).body.depositMinor).toBe(40_000)
  })

  it('seats never go below those held and sold: a 400 naming the count', async () => {
    const id = await newTrip({ seats: 10 })
    await hold(id, fx.trav, 3)
    await hold(id, fx.trav2, 2)
    const low = await patch(id, { seats: 4 })
    expect(low.status).toBe(400)
    expect(low.body.data.fields.seats).toMatch(/below 5: 5 seats are held or sold/)
    expect((await api(`/api/trips/${id}`, { cookie: fx.org })).body.seats).toBe(10)
    const ok = await patch(id, { seats: 5, minGroupSize: 2 })
    expect(ok.status, JSON.stringify(ok.body)).toBe(200)
    const t = (await api(`/api/trips/${id}`, { cookie: fx.org })).body
    expect(t.seats).toBe(5)
    expect(t.seatsLeft).toBe(0)
  })

  it('bookings keep the price and deposit they agreed; new holds pay the new price', async () => {
    const id = await newTrip({ priceMinor: 200_000, depositMinor: 40_000 })
    const b = await hold(id, fx.trav, 2)
    expect((await patch(id, { priceMinor: 260_000, depositMinor: 70_000 })).status).toBe(200)
    const kept = (await api(`/api/bookings/${b}`, { cookie: fx.trav })).body
    expect(kept.priceMinor).toBe(400_000)
    expect(kept.depositMinor).toBe(80_000)
    const b2 = await hold(id, fx.trav2, 1)
    expect((await api(`/api/bookings/${b2}`, { cookie: fx.trav2 })).body.priceMinor).toBe(260_000)
  })

  it('closed sales refuse holds with 409 sales_closed; reopened, holds work again', async () => {
    const id = await newTrip()
    const closed = await patch(id, { salesOpen: false })
    expect(closed.body.changed).toEqual(['salesOpen'])
    expect((await api(`/api/trips/${id}`, { cookie: fx.trav })).body.salesOpen).toBe(false)
    const refused = await api(`/api/trips/${id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: fx.trav })
    expect(refused.status).toBe(409)
    expect(refused.body.data.code).toBe('sales_closed')
    expect(refused.body.message).toMatch(/Sales are closed/)
    expect(await db.selectFrom('bookings').select('id').where('trip_id', '=', id).execute()).toEqual([])
    expect((await patch(id, { salesOpen: true })).status).toBe(200)
    await hold(id, fx.trav, 1)
    const audits = (await db.selectFrom('audit_log').select('detail').where('action', '=', 'trip_update').execute()).map((a) => JSON.parse(a.detail!)).filter((d) => d.tripId === id)
    expect(audits.map((a) => a.changes.salesOpen)).toEqual([{ label: 'Sales', from: 'open', to: 'closed' }, { label: 'Sales', from: 'closed', to: 'open' }])
  })

  it('a trip nobody booked may be unpublished; one with bookings may not (409 has_bookings)', async () => {
    const empty = await newTrip({ title: 'Unpublish me (test)' })
    expect((await api(`/api/trips/${empty}`, { cookie: fx.trav })).status).toBe(200)
    const r = await api(`/api/trips/${empty}/unpublish`, { method: 'POST', cookie: fx.org })
    expect(r.status).toBe(200)
    expect(r.body.status).toBe('draft')
    expect((await api(`/api/trips/${empty}`, { cookie: fx.trav })).status).toBe(404)
    expect((await api(`/api/trips/${empty}/unpublish`, { method: 'POST', cookie: fx.trav })).status).toBe(403)

    const booked = await newTrip()
    const b = await hold(booked, fx.trav, 1)
    // Even a cancelled booking keeps the trip published: its traveller still reads it.
    expect((await api(`/api/bookings/${b}/cancel`, { method: 'POST', body: {}, cookie: fx.trav })).status).toBe(200)
    const refused = await api(`/api/trips/${booked}/unpublish`, { method: 'POST', cookie: fx.org })
    expect(refused.status).toBe(409)
    expect(refused.body.data).toMatchObject({ code: 'has_bookings', bookings: 1 })
    expect((await api(`/api/trips/${booked}`, { cookie: fx.trav })).body.status).toBe('published')
  })

  it('travellers holding seats are e-mailed new dates and meeting point, old and new, through the outbox; a price change is not mailed', async () => {
    const id = await newTrip({ title: 'Changing trip (test)' })
    const b1 = await hold(id, fx.trav, 1)
    const b2 = await hold(id, fx.trav2, 2)
    expect((await patch(id, { priceMinor: 210_000 })).body.notified).toBe(0)
    expect(await changeMails(id)).toEqual([])
    const r = await patch(id, { startDate: '2028-07-20', endDate: '2028-07-25', meetingPoint: { name: 'Harbour gate (test)', lat: 25.7, lon: 32.65, time: '2028-07-22T05:00:00+03:00' } })
    expect(r.body.notified).toBe(2)
    const mails = await changeMails(id)
    expect(mails.map((m) => [m.to_email, m.booking_id])).toEqual([[TRAVELLER, b1], [TRAVELLER2, b2]])
    for (const m of mails) {
      expect(m.subject).toBe('Your trip has changed: Changing trip (test)')
      expect(m.text).toMatch(/First day\n {2}was: 2027-07-31\n {2}now: 2028-07-20/)
      expect(m.text).toMatch(/Last day\n {2}was: 2027-08-03\n {2}now: 2028-07-25/)
      expect(m.text).toContain('was: Old hotel (test), 2027-08-02 06:30 local time (UTC+03:00, Africa/Cairo)')
      expect(m.text).toContain('now: Harbour gate (test), 2028-07-22 05:00 local time (UTC+03:00, Africa/Cairo)')
      expect(m.text).not.toContain('Price')
    }
    // A site change is mailed too, by name.
    expect((await patch(id, { primarySiteId: fx.backupB })).body.notified).toBe(2)
    const site = (await changeMails(id)).at(-1)!
    const names = await db.selectFrom('sites').select(['id', 'name']).where('id', 'in', [fx.luxorSite, fx.backupB]).execute()
    expect(site.text).toContain(`was: ${names.find((s) => s.id === fx.luxorSite)!.name}`)
    expect(site.text).toContain(`now: ${names.find((s) => s.id === fx.backupB)!.name}`)
  })

  it('renaming, moving or deleting a site a booked trip uses asks for confirmation first, naming the trip and its travellers', async () => {
    const mk = async (name: string, lat: number) => {
      const s = await api(`/api/workspaces/${fx.ws}/sites`, { method: 'POST', body: { name, lat, lon: 32.7 }, cookie: fx.org })
      expect(s.status).toBe(201)
      return s.body.id as number
    }
    const main = await mk('Confirm main (test)', 25.8)
    const spare = await mk('Confirm spare (test)', 25.9)
    const id = await newTrip({ title: 'Site change trip (test)', primarySiteId: main, backupSiteIds: [spare] })
    await hold(id, fx.trav, 2)

    const ask = await api(`/api/sites/${main}`, { method: 'PATCH', body: { name: 'Confirm main, renamed (test)' }, cookie: fx.org })
    expect(ask.status).toBe(409)
    expect(ask.body.data).toMatchObject({ code: 'confirm_needed', travellers: 1, trips: [{ tripId: id, title: 'Site change trip (test)', travellers: 1, seats: 2 }] })
    expect(ask.body.message).toContain('"Site change trip (test)" (1 traveller, 2 seats)')
    expect((await db.selectFrom('sites').select('name').where('id', '=', main).executeTakeFirstOrThrow()).name).toBe('Confirm main (test)')
    expect(await changeMails(id)).toEqual([])
    // An edit that neither renames nor moves it needs no confirmation.
    expect((await api(`/api/sites/${main}`, { method: 'PATCH', body: { notes: 'Shade by the wall' }, cookie: fx.org })).status).toBe(200)

    const done = await api(`/api/sites/${main}?confirm=true`, { method: 'PATCH', body: { name: 'Confirm main, renamed (test)', lat: 25.81 }, cookie: fx.org })
    expect(done.status, JSON.stringify(done.body)).toBe(200)
    const [mail] = await changeMails(id)
    expect(mail!.to_email).toBe(TRAVELLER)
    expect(mail!.text).toContain('was: Confirm main (test) (25.8000°, 32.7000°')
    expect(mail!.text).toContain('now: Confirm main, renamed (test) (25.8100°, 32.7000°')

    // Deleting: the primary site cannot go; the fallback asks, then is dropped from the trip and its travellers told.
    const primary = await api(`/api/sites/${main}?confirm=true`, { method: 'DELETE', cookie: fx.org })
    expect(primary.status).toBe(409)
    expect(primary.body.data.code).toBe('site_in_use')
    const askDel = await api(`/api/sites/${spare}`, { method: 'DELETE', cookie: fx.org })
    expect(askDel.status).toBe(409)
    expect(askDel.body.data).toMatchObject({ code: 'confirm_needed', travellers: 1 })
    expect(askDel.body.message).toContain('Site change trip (test)')
    expect((await api(`/api/sites/${spare}?confirm=true`, { method: 'DELETE', cookie: fx.org })).status).toBe(200)
    expect(await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', id).execute()).toEqual([])
    expect((await changeMails(id)).at(-1)!.text).toContain('Confirm spare (test) is no longer a fallback site')
  })

  it('PUT guides assigns and removes them; a guide not assigned gets 403 not_assigned with a plain message', async () => {
    const id = await newTrip({ title: 'Guided trip (test)' })
    const before = await api(`/api/trips/${id}/timetable`, { cookie: fx.other })
    expect(before.status).toBe(403)
    expect(before.body.data.code).toBe('not_assigned')
    expect(before.body.message).toMatch(/not assigned to this trip/)
    expect(before.body.message).not.toMatch(/No such trip/)
    for (const path of ['participants', 'timetable.pdf', 'briefing', `sites/${fx.luxorSite}/timetable.ics`]) {
      const r = await api(`/api/trips/${id}/${path}`, { cookie: fx.other })
      expect([path, r.status, r.body.data?.code]).toEqual([path, 403, 'not_assigned'])
    }
    // A trip that does not exist is still a 404, for guides too.
    expect((await api('/api/trips/999999/timetable', { cookie: fx.other })).status).toBe(404)

    const put = await api(`/api/trips/${id}/guides`, { method: 'PUT', body: { userIds: [fx.otherId, fx.guideId] }, cookie: fx.org })
    expect(put.status, JSON.stringify(put.body)).toBe(200)
    expect(put.body.data.filter((g: { assigned: boolean }) => g.assigned).map((g: { id: number }) => g.id).sort()).toEqual([fx.guideId, fx.otherId].sort())
    expect((await api(`/api/trips/${id}/timetable`, { cookie: fx.other })).status).toBe(200)
    const myTrips = await api('/api/me/trips', { cookie: fx.other })
    expect(myTrips.body.data.map((t: { id: number }) => t.id)).toEqual([id])
    expect(myTrips.body.data[0].sites[0]).toMatchObject({ id: fx.luxorSite, primary: true })

    const removed = await api(`/api/trips/${id}/guides`, { method: 'PUT', body: { userIds: [fx.guideId] }, cookie: fx.org })
    expect(removed.status).toBe(200)
    expect((await api(`/api/trips/${id}/timetable`, { cookie: fx.other })).status).toBe(403)
    expect((await api('/api/me/trips', { cookie: fx.other })).body.data).toEqual([])
    const audits = (await db.selectFrom('audit_log').select('detail').where('action', '=', 'trip_guides').execute()).map((a) => JSON.parse(a.detail!)).filter((d) => d.tripId === id)
    expect(audits).toEqual([{ tripId: id, added: [fx.otherId, fx.guideId], removed: [] }, { tripId: id, added: [], removed: [fx.otherId] }])

    const bad = await api(`/api/trips/${id}/guides`, { method: 'PUT', body: { userIds: [fx.travId] }, cookie: fx.org })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.userIds).toContain(`Account ${fx.travId} is not a guide or organiser`)
    expect((await api(`/api/trips/${id}/guides`, { method: 'PUT', body: { userIds: [] }, cookie: fx.guide })).status).toBe(403)
  })

  it('an assigned guide sees the trip page with its tools flag, even a draft; others do not', async () => {
    const draft = await newTrip({ title: 'Draft for the guide (test)' }, false)
    expect((await api(`/api/trips/${draft}`, { cookie: fx.other })).status).toBe(404)
    expect((await api(`/api/trips/${draft}/guides`, { method: 'PUT', body: { userIds: [fx.otherId] }, cookie: fx.org })).status).toBe(200)
    const seen = await api(`/api/trips/${draft}`, { cookie: fx.other })
    expect(seen.status).toBe(200)
    expect(seen.body.viewer).toEqual({ assignedGuide: true })
    expect((await api(`/api/trips/${draft}`, { cookie: fx.trav })).status).toBe(404)
    expect((await api(`/api/trips/${draft}`, { cookie: fx.org })).body.viewer).toEqual({ assignedGuide: false })
  })

  it('after sign-in each role lands on its own start page: the organiser\'s trips, the guide\'s trips, the traveller\'s bookings', async () => {
    const { landingFor } = await import('../../shared/schemas/tripOps')
    const page = async (path: string, cookie: string) => {
      const r = await api(path, { cookie, headers: { accept: 'text/html' } })
      expect(r.status, path).toBe(200)
      return String(r.body)
    }
    // Each landing page shows what that role works on, read from the rendered page.
    expect(await page(landingFor('organiser'), fx.org)).toContain('New trip')
    const guidePage = await page(landingFor('guide'), fx.guide)
    expect(guidePage).toContain('My trips')
    expect(guidePage).toContain(DEMO_TRIP_TITLE)
    expect(guidePage).toContain('Timetable')
    expect(await page(landingFor('traveller'), fx.trav)).toContain('My bookings')
    expect(new Set([landingFor('organiser'), landingFor('guide'), landingFor('traveller')]).size).toBe(3)
  })
})
