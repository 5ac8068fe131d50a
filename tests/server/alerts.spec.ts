import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { isPostgres } from '../../server/database/dialect'
import { sendAlertDigests } from '../../server/services/operations/alerts'
import { advanceClock, api, ORGANISER, signIn, TEST_DB, until, useApp } from './app'
import { freshAccount, hold, payDue, publishedTrip } from './operationsHelpers'

// Housekeeping ticks every second (tests/server/app.ts); the digest runs in it.
const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
// A second connection to the same database: another instance racing the app's housekeeping for a
// digest. On PostgreSQL two such connections race too; on SQLite one (better-sqlite3 waits for the
// file lock synchronously, so two connections in one process would wait on each other, not race).
const db2 = openDatabase(dbTarget)
const racers = isPostgres(db) ? [db, db2] : [db]
afterAll(async () => { await db.destroy(); await db2.destroy() })

const DAY_MS = 24 * 3600_000
type Alert = { id: number; kind: string; tripId: number; bookingId: number | null; read: boolean; summary: string; delivery: string; digestDate: string | null }
const alertsOf = async (cookie: string) => (await api('/api/alerts', { cookie })).body as { data: Alert[]; meta: { unread: number; mode: string } }
const mailsTo = (email: string, kind: string) => db.selectFrom('outbox').select(['subject', 'text', 'html']).where('to_email', '=', email).where('kind', '=', kind).orderBy('id').execute()

describe(`organisers' alerts (${TEST_DB})`, () => {
  it('a booking, a payment, a waitlist entry and a cancellation each alert every organiser, listed unread until marked read', async () => {
    const org = await signIn(ORGANISER)
    const second = await freshAccount(org, 'Alert Second Organiser', 'organiser')
    const tripId = await publishedTrip(org, { seats: 1 })
    const [booker, waiter] = [await freshAccount(org, 'Alert Booker'), await freshAccount(org, 'Alert Waiter')]
    const unreadBefore = (await alertsOf(org)).meta.unread
    const b = await hold(tripId, booker.cookie)
    await payDue(b, booker.cookie)
    expect((await api(`/api/trips/${tripId}/waitlist`, { method: 'POST', body: { seats: 1 }, cookie: waiter.cookie })).status).toBe(201)
    expect((await api(`/api/bookings/${b}/cancel`, { method: 'POST', body: {}, cookie: org })).status).toBe(200)
    // A refused hold (the freed seat is offered to the waitlist) is no event: no alert.
    expect((await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: booker.cookie })).status).toBe(409)

    for (const cookie of [org, second.cookie]) {
      const mine = (await alertsOf(cookie)).data.filter((a) => a.tripId === tripId)
      expect(mine.map((a) => a.kind)).toEqual(['cancellation', 'waitlist', 'payment', 'booking'])
      expect(mine.every((a) => !a.read)).toBe(true)
      expect(mine.map((a) => a.summary)).toEqual([
        `Booking #${b} of Alert Booker (1 seat) was cancelled by an organiser`,
        'Alert Waiter joined the waitlist for 1 seat',
        `Alert Booker paid €400.00 (deposit) on booking #${b}`,
        `Alert Booker holds 1 seat (booking #${b})`,
      ])
    }
    const list = await alertsOf(org)
    expect(list.meta.unread).toBe(unreadBefore + 4)
    const payment = list.data.find((a) => a.tripId === tripId && a.kind === 'payment')!
    // Another organiser's alert id is ignored: each marks only their own.
    const theirs = (await alertsOf(second.cookie)).data.find((a) => a.tripId === tripId && a.kind === 'payment')!
    expect((await api('/api/alerts/read', { method: 'POST', body: { ids: [payment.id, theirs.id] }, cookie: org })).body).toEqual({ marked: 1 })
    const after = await alertsOf(org)
    expect(after.meta.unread).toBe(unreadBefore + 3)
    expect(after.data.find((a) => a.id === payment.id)!.read).toBe(true)
    expect((await alertsOf(second.cookie)).data.find((a) => a.id === theirs.id)!.read).toBe(false)
    expect((await api('/api/alerts/read', { method: 'POST', body: { all: true }, cookie: second.cookie })).status).toBe(200)
    expect((await alertsOf(second.cookie)).meta.unread).toBe(0)
    // Travellers have no alerts.
    expect((await api('/api/alerts', { cookie: booker.cookie })).status).toBe(403)
    expect((await api('/api/alerts/read', { method: 'POST', body: {}, cookie: org })).status).toBe(400)
  })

  it('"immediate" mails each alert with its event; "digest" mails one digest the next business day, once, even with two instances racing', async () => {
    const org = await signIn(ORGANISER)
    const digester = await freshAccount(org, 'Alert Digest Organiser', 'organiser')
    expect((await api('/api/alerts/preferences', { method: 'PUT', body: { mode: 'digest' }, cookie: digester.cookie })).body).toEqual({ mode: 'digest' })
    expect((await api('/api/alerts/preferences', { method: 'PUT', body: { mode: 'weekly' }, cookie: digester.cookie })).status).toBe(400)
    expect((await alertsOf(digester.cookie)).meta.mode).toBe('digest')
    const orgEmail = ORGANISER
    const tripId = await publishedTrip(org, { title: 'Digest trip (test)' })
    const t = await freshAccount(org, 'Alert Digest Booker')
    const immediateBefore = (await mailsTo(orgEmail, 'organiser-alert')).length

    const b = await hold(tripId, t.cookie)
    // Immediate: the mail is queued with the event itself.
    const immediate = await mailsTo(orgEmail, 'organiser-alert')
    expect(immediate.length).toBe(immediateBefore + 1)
    expect(immediate.at(-1)!.text).toContain(`Alert Digest Booker holds 1 seat (booking #${b})`)
    // Digest: nothing yet.
    expect(await mailsTo(digester.email, 'organiser-alert')).toEqual([])
    expect(await mailsTo(digester.email, 'organiser-digest')).toEqual([])
    const waiting = (await alertsOf(digester.cookie)).data.filter((a) => a.tripId === tripId)
    expect(waiting.map((a) => [a.kind, a.delivery, a.digestDate])).toEqual([['booking', 'digest', null]])

    // The next business day: housekeeping sends the digest; two more "instances" race it for the same day.
    const nextDay = (await advanceClock(DAY_MS)).slice(0, 10)
    const url = 'http://127.0.0.1'
    await Promise.all(racers.map((d) => sendAlertDigests(d, url, nextDay)))
    const digests = await until(() => mailsTo(digester.email, 'organiser-digest'), (m) => m.length > 0)
    expect(digests.length).toBe(1)
    expect(digests[0]!.subject).toMatch(new RegExp(`alerts? before ${nextDay}$`))
    expect(digests[0]!.text).toContain(`Alert Digest Booker holds 1 seat (booking #${b})`)
    expect(digests[0]!.text).toContain('DIGEST TRIP (TEST)')
    // More ticks of the same day send nothing more, though a new alert now waits (holds of the day before have lapsed).
    const t2 = await freshAccount(org, 'Alert Second Booker')
    const b2 = await hold(tripId, t2.cookie)
    await Promise.all(racers.map((d) => sendAlertDigests(d, url, nextDay)))
    await new Promise((r) => setTimeout(r, 2500)) // two housekeeping ticks of real time (no business time passes)
    expect((await mailsTo(digester.email, 'organiser-digest')).length).toBe(1)
    expect((await db.selectFrom('alert_digests').selectAll().where('user_id', '=', digester.id).execute()).map((d) => [d.business_date, d.alert_count])).toEqual([[nextDay, 1]])
    const stamped = (await alertsOf(digester.cookie)).data.filter((a) => a.tripId === tripId)
    expect(stamped.map((a) => [a.kind, a.bookingId, a.digestDate])).toEqual([['booking', b2, null], ['booking', b, nextDay]])

    // The day after: one more digest, with only the alert that waited since.
    const dayAfter = (await advanceClock(DAY_MS)).slice(0, 10)
    const second = await until(() => mailsTo(digester.email, 'organiser-digest'), (m) => m.length > 1)
    expect(second.length).toBe(2)
    expect(second[1]!.text).toContain(`Alert Second Booker holds 1 seat (booking #${b2})`)
    expect(second[1]!.text).not.toContain(`booking #${b})`)
    expect(second[1]!.subject).toMatch(new RegExp(`1 alert before ${dayAfter}$`))
    // Back to immediate: the next alert is mailed at once, and never digested.
    expect((await api('/api/alerts/preferences', { method: 'PUT', body: { mode: 'immediate' }, cookie: digester.cookie })).status).toBe(200)
    await hold(tripId, t.cookie)
    expect((await mailsTo(digester.email, 'organiser-alert')).map((m) => m.subject)).toEqual(['New booking: Digest trip (test)'])
  })
})
