import { createECDH, randomBytes } from 'node:crypto'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { url } from '@nuxt/test-utils/e2e'
import { openDatabase } from '../../server/database/connection'
import { DEMO_TRIP_TITLE } from '../../server/database/seed/demo'
import { sealParticipantField } from '../../server/services/people/participantSeal'
import { advanceClock, api, caughtMail, GUIDE, inviteAndChoosePassword, ORGANISER, signIn, TEST_DB, TEST_PORTS, TRAVELLER, TRAVELLER2, until, useApp } from './app'

const SESSION_PASSWORD = 'test-session-password-that-is-long-enough-0123456789'
const { dbTarget } = await useApp()
// The participant rows are written here, sealed with the app's key (derived from its session secret).
process.env.NUXT_SESSION_PASSWORD = SESSION_PASSWORD
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

const SMS_FAKE = `http://127.0.0.1:${TEST_PORTS.fakes.SMS_FAKE_PORT}`
/** Invented numbers, unique to this file (the SMS fake is shared by the run). */
const PHONE = { seat1: '+15550100201', seat2: '+15550100202' }
interface Sms { to: string; body: string; at: string }
const texts = async (): Promise<Sms[]> => (await fetch(`${SMS_FAKE}/_fake/messages`)).json() as Promise<Sms[]>
const textsTo = async (to: string) => (await texts()).filter((m) => m.to === to)
const ackToken = (text: string) => {
  const m = /\/ack\/([A-Za-z0-9_-]{20,})/.exec(text)
  if (!m) throw new Error(`no acknowledgement link in: ${text}`)
  return m[1]!
}

const fx = { org: '', guide: '', trav: '', booked: '', other: '', tripId: 0, primary: 0, backups: [] as number[], bookingId: 0, departAt: '2027-08-02T05:00:00+02:00' }

beforeAll(async () => {
  fx.org = await signIn(ORGANISER)
  fx.guide = await signIn(GUIDE)
  fx.trav = await signIn(TRAVELLER)
  fx.booked = await signIn(TRAVELLER2)
  const email = `decision-other-${Date.now()}@umbrafield.test`
  await inviteAndChoosePassword(fx.org, { name: 'Unassigned guide (test)', email, role: 'guide' }, 'decision-other-pw')
  fx.other = await signIn(email, 'decision-other-pw')
  const trip = await db.selectFrom('trips').select(['id', 'primary_site_id']).where('title', '=', DEMO_TRIP_TITLE).executeTakeFirstOrThrow()
  fx.tripId = trip.id
  fx.primary = trip.primary_site_id
  fx.backups = (await db.selectFrom('trip_backup_sites').select('site_id').where('trip_id', '=', trip.id).orderBy('rank').execute()).map((r) => r.site_id)
  const booking = await db.selectFrom('bookings').select(['id', 'seats']).where('trip_id', '=', trip.id).where('status', '=', 'confirmed').executeTakeFirstOrThrow()
  expect(booking.seats).toBe(2)
  fx.bookingId = booking.id
  // The manifest: both seats of the demo booking, each with a mobile number (sealed as the forms seal it).
  for (const [seat, phone, name] of [[1, PHONE.seat1, 'Samir Haddad (test)'], [2, PHONE.seat2, 'Lina Haddad (test)']] as const) {
    await db.insertInto('participants').values({ booking_id: booking.id, seat, full_name: name, mobile_phone_sealed: sealParticipantField(booking.id, seat, 'mobilePhone', phone) })
      .onConflict((oc) => oc.columns(['booking_id', 'seat']).doUpdateSet({ full_name: name, mobile_phone_sealed: sealParticipantField(booking.id, seat, 'mobilePhone', phone) })).execute()
  }
})

interface Push { name: string; encoding: string | null; vapid: string | null; bytes: number }
const pushes = async (): Promise<Push[]> => (await fetch(`${SMS_FAKE}/_fake/pushes`)).json() as Promise<Push[]>
/** A device's subscription, as a browser makes it (P-256 key and 16-byte secret, RFC 8291), pointing at the fake's receiver. */
const PUSH_RUN = randomBytes(4).toString('hex')
const subscription = (name: string) => ({
  endpoint: `${SMS_FAKE}/_fake/push/${name}-${PUSH_RUN}`,
  keys: { p256dh: createECDH('prime256v1').generateKeys().toString('base64url'), auth: randomBytes(16).toString('base64url') },
})

const board = (cookie = fx.org) => api(`/api/trips/${fx.tripId}/decision`, { cookie })
const decide = (body: Record<string, unknown>, cookie = fx.org) => api(`/api/trips/${fx.tripId}/decision`, { method: 'POST', body, cookie })

describe(`the day's decision (${TEST_DB})`, () => {
  it('refuses a site that is not one of the trip\'s, naming siteId', async () => {
    const other = await db.selectFrom('sites').select('id').where('id', 'not in', [fx.primary, ...fx.backups]).executeTakeFirstOrThrow()
    const r = await decide({ siteId: other.id, departAt: fx.departAt })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields)).toEqual(['siteId'])
    expect(await db.selectFrom('trip_decisions').select('id').where('trip_id', '=', fx.tripId).execute()).toEqual([])
  })

  it('refuses travellers and guides not on the trip; guides of the trip only read', async () => {
    expect((await decide({ siteId: fx.primary, departAt: fx.departAt }, fx.trav)).status).toBe(403)
    expect((await decide({ siteId: fx.primary, departAt: fx.departAt }, fx.booked)).status).toBe(403)
    expect((await decide({ siteId: fx.primary, departAt: fx.departAt }, fx.guide)).status).toBe(403)
    expect((await decide({ siteId: fx.primary, departAt: fx.departAt }, fx.other)).status).toBe(403)
    expect((await board(fx.trav)).status).toBe(403)
    expect((await board(fx.booked)).status).toBe(403)
    // A guide of another trip is told plainly they are not assigned to this one.
    const other = await board(fx.other)
    expect(other.status).toBe(403)
    expect(other.body.data.code).toBe('not_assigned')
    const g = await board(fx.guide)
    expect(g.status).toBe(200)
    expect(g.body.current).toBeNull()
    expect((await api(`/api/trips/${fx.tripId}/decision/resend`, { method: 'POST', body: {}, cookie: fx.guide })).status).toBe(403)
  })

  it('reaches every confirmed participant and guide by e-mail and SMS; is audited; names the chosen site first', async () => {
    // Devices that opted in: the guide's, and the booking holder's (pushes go for seat 1 only).
    expect((await api('/api/push/subscriptions', { method: 'POST', body: subscription('guide'), cookie: fx.guide })).status).toBe(201)
    expect((await api('/api/push/subscriptions', { method: 'POST', body: subscription('holder'), cookie: fx.booked })).status).toBe(201)
    const chosen = fx.backups[0]!
    const r = await decide({ siteId: chosen, departAt: fx.departAt, meetingPoint: 'Qena bus station (test)', message: 'Bring water (test).' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    expect(r.body.recipients).toBe(3) // two seats and the trip's guide

    // E-mail: the booking holder gets one per seat (the second "for" its participant), the guide one.
    // This decision's own mail: earlier test files' apps (on the same port) wrote decisions to the same
    // catcher and demo accounts, so the mail is picked by this test's own meeting point.
    const holderMail = await caughtMail(TRAVELLER2, /^Eclipse day: we go to /, { containing: 'Qena bus station (test)' })
    expect(holderMail.text).toContain('Qena bus station (test)')
    const guideMail = await caughtMail(GUIDE, /^Eclipse day: we go to /, { containing: 'Qena bus station (test)' })
    expect(ackToken(guideMail.text)).not.toBe(ackToken(holderMail.text))
    // SMS to each participant's own number, through the SDK and the fake.
    const sms = await until(texts, (l) => [PHONE.seat1, PHONE.seat2].every((p) => l.some((m) => m.to === p)), 20_000)
    for (const p of [PHONE.seat1, PHONE.seat2]) {
      const m = sms.find((x) => x.to === p)!
      expect(m.body).toMatch(/we go to .+\. Meet at Qena bus station \(test\)/)
      expect(m.body).toContain(`${url('/ack/')}`)
    }
    // Tokens are never stored in clear: only hashes and sealed copies.
    const rows = await db.selectFrom('decision_recipients').selectAll().execute()
    for (const row of rows) {
      expect(row.token_hash).toMatch(/^[0-9a-f]{64}$/)
      expect(JSON.stringify(row)).not.toContain(ackToken(guideMail.text))
    }

    const b = await until(() => board(), (x) => x.body.recipients?.every((p: any) => p.delivered.email === 'sent') && x.body.recipients.filter((p: any) => p.kind === 'participant').every((p: any) => p.delivered.sms === 'sent'), 20_000)
    expect(b.body.current.siteId).toBe(chosen)
    expect(b.body.recipients.map((p: any) => [p.kind, p.seat, p.delivered.sms, p.acknowledgedAt])).toEqual([
      ['participant', 1, 'sent', null], ['participant', 2, 'sent', null], ['guide', null, null, null],
    ])
    // Web Push: encrypted (RFC 8188 aes128gcm) and signed (RFC 8292 VAPID), one to each opted-in device.
    const got = await until(pushes, (l) => l.filter((x) => x.name.endsWith(PUSH_RUN)).length >= 2, 20_000)
    const mine = got.filter((x) => x.name.endsWith(PUSH_RUN))
    expect(mine.map((x) => x.name.split('-')[0]).sort()).toEqual(['guide', 'holder'])
    for (const x of mine) {
      expect(x.encoding).toBe('aes128gcm')
      expect(x.vapid).not.toBeNull()
      expect(x.bytes).toBeGreaterThan(100)
    }
    const withPush = await until(() => board(), (x) => x.body.recipients.filter((p: any) => p.delivered.push).every((p: any) => p.delivered.push === 'sent'), 20_000)
    expect(withPush.body.recipients.map((p: any) => p.delivered.push)).toEqual(['sent', null, 'sent'])
    const audits = await db.selectFrom('audit_log').select(['action', 'detail']).where('action', 'like', 'decision_%').execute()
    expect(audits.map((a) => a.action)).toEqual(['decision_make'])
    expect(JSON.parse(audits[0]!.detail!)).toMatchObject({ tripId: fx.tripId, siteId: chosen, previousSiteId: null })

    // Timetable, briefing and calendar name the chosen site first.
    const tt = await api(`/api/trips/${fx.tripId}/timetable`, { cookie: fx.guide })
    expect(tt.body.sites[0].siteId).toBe(chosen)
    expect(tt.body.sites[0].chosen).toBe(true)
    expect(tt.body.decision).toMatchObject({ siteId: chosen, meetingPoint: 'Qena bus station (test)', departAt: '2027-08-02T03:00:00.000Z' })
    const br = await api(`/api/trips/${fx.tripId}/briefing`, { cookie: fx.booked })
    expect(br.body.site.id).toBe(chosen)
    expect(br.body.decision.siteId).toBe(chosen)
    const ics = await api(`/api/trips/${fx.tripId}/sites/${chosen}/timetable.ics`, { cookie: fx.guide })
    expect(String(ics.body)).toMatch(/SUMMARY:Leave for .+ \(the day's decision\)/)
    const icsPrimary = await api(`/api/trips/${fx.tripId}/sites/${fx.primary}/timetable.ics`, { cookie: fx.guide })
    expect(String(icsPrimary.body)).not.toContain('Leave for')
  })

  it('opening the link records nothing; the button acknowledges once', async () => {
    const token = ackToken((await textsTo(PHONE.seat1)).at(-1)!.body)
    const view = await api(`/api/ack/${token}`)
    expect(view.status).toBe(200)
    expect(view.body).toMatchObject({ name: 'Samir Haddad (test)', meetingPoint: 'Qena bus station (test)', acknowledgedAt: null, superseded: false })
    // The page itself, as a mail scanner would fetch it.
    const page = await fetch(url(`/ack/${token}`))
    expect(page.status).toBe(200)
    expect(await page.text()).toContain('I have seen this')
    expect((await board()).body.recipients.every((p: any) => p.acknowledgedAt === null)).toBe(true)

    const first = await api(`/api/ack/${token}`, { method: 'POST', body: {} })
    expect(first.status).toBe(200)
    expect(first.body.already).toBe(false)
    const second = await api(`/api/ack/${token}`, { method: 'POST', body: {} })
    expect(second.body).toEqual({ acknowledgedAt: first.body.acknowledgedAt, already: true })
    const b = await board()
    expect(b.body.recipients.map((p: any) => !!p.acknowledgedAt)).toEqual([true, false, false])
    expect(b.body.meta).toEqual({ recipients: 3, acknowledged: 1 })
    expect((await db.selectFrom('audit_log').select('id').where('action', '=', 'decision_ack').execute()).length).toBe(1)
    expect((await api('/api/ack/not-a-real-token-at-all-0000000000', { method: 'POST', body: {} })).status).toBe(404)
  })

  it('re-sends only to those who have not acknowledged, with the same links', async () => {
    const before = { seat1: (await textsTo(PHONE.seat1)).length, seat2: (await textsTo(PHONE.seat2)).length }
    const seat2Token = ackToken((await textsTo(PHONE.seat2)).at(-1)!.body)
    const r = await api(`/api/trips/${fx.tripId}/decision/resend`, { method: 'POST', body: {}, cookie: fx.org })
    expect(r.status).toBe(200)
    expect(r.body.resent).toBe(2)
    const after = await until(() => textsTo(PHONE.seat2), (l) => l.length > before.seat2, 20_000)
    expect(after.length).toBe(before.seat2 + 1)
    expect(ackToken(after.at(-1)!.body)).toBe(seat2Token)
    expect((await textsTo(PHONE.seat1)).length).toBe(before.seat1)
    const outbox = await db.selectFrom('outbox').select(['to_email']).where('kind', '=', 'decision').execute()
    // First round: two mails to the holder, one to the guide; the re-send: seat 2's (to the holder) and the guide's.
    expect(outbox.map((o) => o.to_email).sort()).toEqual([GUIDE, GUIDE, TRAVELLER2, TRAVELLER2, TRAVELLER2].sort())
  })

  it('may change until C1, retrying an SMS the provider refused; the old link then acknowledges nothing', async () => {
    const oldToken = ackToken((await textsTo(PHONE.seat2)).at(-1)!.body)
    const failed = await fetch(`${SMS_FAKE}/_fake/fail`, { method: 'POST', body: JSON.stringify({ count: 1 }) })
    expect(failed.status).toBe(200)
    const before = (await texts()).filter((m) => Object.values(PHONE).includes(m.to)).length
    const r = await decide({ siteId: fx.primary, departAt: '2027-08-02T04:30:00+02:00' })
    expect(r.status, JSON.stringify(r.body)).toBe(201)
    const decisionId = r.body.id
    // One of the two texts is refused once and waits for its retry (5 s backoff): move the clock, do not sleep.
    const refused = await until(() => db.selectFrom('decision_messages').innerJoin('decision_recipients', 'decision_recipients.id', 'decision_messages.recipient_id')
      .select(['decision_messages.id', 'decision_messages.status', 'decision_messages.attempts', 'decision_messages.last_error'])
      .where('decision_recipients.decision_id', '=', decisionId).where('decision_messages.channel', '=', 'sms').where('decision_messages.attempts', '>=', 1).execute(),
    (l) => l.some((m) => m.last_error !== null), 20_000)
    const retried = refused.find((m) => m.last_error !== null)!
    expect(retried.status).toBe('queued')
    await advanceClock(60_000)
    const done = await until(() => db.selectFrom('decision_messages').select(['status', 'attempts']).where('id', '=', retried.id).executeTakeFirstOrThrow(), (m) => m.status === 'sent', 20_000)
    expect(done).toEqual({ status: 'sent', attempts: 2 })
    expect((await texts()).filter((m) => Object.values(PHONE).includes(m.to)).length).toBe(before + 2)
    const b = await until(() => board(), (x) => x.body.recipients.filter((p: any) => p.kind === 'participant').every((p: any) => p.delivered.sms === 'sent'), 20_000)
    expect(b.body.current.siteId).toBe(fx.primary)
    expect(b.body.history.map((h: any) => h.siteId)).toEqual([fx.primary, fx.backups[0]])
    expect(b.body.recipients.every((p: any) => p.acknowledgedAt === null)).toBe(true)
    const old = await api(`/api/ack/${oldToken}`, { method: 'POST', body: {} })
    expect(old.status).toBe(409)
    expect(old.body.data.code).toBe('decision_superseded')
    expect((await api(`/api/ack/${oldToken}`)).body.superseded).toBe(true)
    expect((await db.selectFrom('audit_log').select('action').where('action', '=', 'decision_change').execute()).length).toBe(1)
  })

  it('refuses a change once C1 has begun at the site in force (409 decision_locked)', async () => {
    const tt = await api(`/api/trips/${fx.tripId}/timetable`, { cookie: fx.org })
    const c1 = Date.parse(tt.body.sites[0].contacts.c1.utc)
    const now = Date.parse(await advanceClock(0))
    // One minute before C1 a change still goes through.
    await advanceClock(c1 - now - 60_000)
    expect((await decide({ siteId: fx.primary, departAt: fx.departAt })).status).toBe(201)
    await advanceClock(61_000)
    const r = await decide({ siteId: fx.backups[1]!, departAt: fx.departAt })
    expect(r.status).toBe(409)
    expect(r.body.data).toMatchObject({ code: 'decision_locked', c1Utc: tt.body.sites[0].contacts.c1.utc })
    expect((await board()).body.current.locked).toBe(true)
  })
})
