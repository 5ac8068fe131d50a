import { simpleParser, type ParsedMail } from 'mailparser'
import { SMTPServer } from 'smtp-server'
import { afterAll, describe, expect, it } from 'vitest'
import { freePort } from '../../scripts/free-port.mjs'
import { api, GUIDE, ORGANISER, signIn, STRIPE_FAKE, TRAVELLER, until, useApp } from './app'


// An in-process SMTP catcher (smtp-server + mailparser) that the tests can stop and start.
const SMTP_PORT = await freePort()
const inbox: ParsedMail[] = []
let smtp: SMTPServer | null = null
async function startSmtp() {
  smtp = new SMTPServer({
    authOptional: true, disabledCommands: ['STARTTLS'], logger: false,
    onData(stream, _session, cb) { simpleParser(stream).then((m) => { inbox.push(m); cb() }, cb) },
  })
  await new Promise<void>((r) => smtp!.listen(SMTP_PORT, '127.0.0.1', r))
}
async function stopSmtp() { await new Promise<void>((r) => (smtp ? smtp.close(() => r()) : r())); smtp = null }
await startSmtp()
afterAll(stopSmtp)

await useApp({ NUXT_MAIL_SMTP_PORT: String(SMTP_PORT), UMBRAFIELD_MAIL_POLL_MS: '150', UMBRAFIELD_MAIL_BACKOFF_MS: '150', UMBRAFIELD_MAIL_MAX_ATTEMPTS: '40' })

async function waitFor(pred: () => boolean, ms = 15_000) {
  const end = Date.now() + ms
  while (!pred() && Date.now() < end) await new Promise((r) => setTimeout(r, 100))
  return pred()
}

/** Minimal RFC 5545 reader: unfolds lines and checks BEGIN/END nesting; returns the components with their properties. */
function parseIcs(text: string) {
  const lines = text.replace(/\r?\n[ \t]/g, '').split(/\r?\n/).filter(Boolean)
  const stack: Array<{ name: string; props: Record<string, string> }> = []
  const done: Array<{ name: string; props: Record<string, string> }> = []
  for (const l of lines) {
    const i = l.indexOf(':')
    if (i < 0) throw new Error(`not a content line: ${l}`)
    const [key, value] = [l.slice(0, i).split(';')[0]!, l.slice(i + 1)]
    if (key === 'BEGIN') stack.push({ name: value, props: {} })
    else if (key === 'END') { const c = stack.pop(); if (!c || c.name !== value) throw new Error(`END:${value} without BEGIN`); done.push(c) }
    else stack[stack.length - 1]!.props[key] = value
  }
  if (stack.length) throw new Error('unclosed component')
  return done
}

const icsUtc = (utc: string) => new Date(Math.round(Date.parse(utc) / 1000) * 1000).toISOString().replace(/[-:]/g, '').slice(0, 15) + 'Z'

describe('itinerary and booking e-mail', () => {
  it('a traveller cannot send itineraries; the organiser previews, then queues one per confirmed participant', async () => {
    expect((await api('/api/trips/1/itinerary', { method: 'POST', body: { confirm: true }, cookie: await signIn(TRAVELLER) })).status).toBe(403)
    expect((await api('/api/trips/1/itinerary', { method: 'POST', body: { confirm: true }, cookie: await signIn(GUIDE) })).status).toBe(403)
    const org = await signIn(ORGANISER)
    expect((await api('/api/trips/1/itinerary', { method: 'POST', body: {}, cookie: org })).status).toBe(400)
    const preview = await api('/api/trips/1/itinerary', { cookie: org })
    expect(preview.body.recipients).toBe(1)
    expect(preview.body.preview.subject).toMatch(/itinerary/)
    const r = await api('/api/trips/1/itinerary', { method: 'POST', body: { confirm: true }, cookie: org })
    expect(r.body).toEqual({ queued: 1 })
    expect(await waitFor(() => inbox.some((m) => m.subject?.includes('itinerary')))).toBe(true)
    const mail = inbox.find((m) => m.subject?.includes('itinerary'))!
    expect(mail.to && 'value' in mail.to ? mail.to.value[0]!.address : '').toBe('traveller2@umbrafield.test')
    const t = await api('/api/trips/1/timetable', { cookie: org })
    const c2 = t.body.sites[0].contacts.c2
    expect(mail.text).toContain(c2.local.slice(11)) // local C2 time, to the second
    expect(mail.html).toContain(c2.local.slice(11))
    expect(mail.text).toContain('ISO 12312-2')
    expect(mail.text).toContain('Local rules and qualified advice come first.')
    expect(mail.text).toContain('C2 — totality begins')
    // The time basis is stated: clock times in UTC, with TT − UTC and UT1 − UTC.
    // The line under the contact times says which column is local and which UTC (never "Times are UTC" alone).
    expect(mail.text).toMatch(/Local times are the site's clock, [^;]+; the UTC column is UTC;.*TT − UTC = 69\.184 s.*UT1 − UTC/)
    expect(mail.text).not.toMatch(/Times are UTC/)
    // C2 in UTC is the same second as the local C2 beside it: rounded, not cut off.
    expect(mail.text).toContain(`(${new Date(Math.round(Date.parse(c2.utc) / 1000) * 1000).toISOString().slice(11, 19)} UTC)`)
    expect(mail.messageId).toMatch(/@umbrafield>?$/)
    const ics = mail.attachments.find((a) => a.contentType.startsWith('text/calendar'))!
    const comps = parseIcs(ics.content.toString('utf8'))
    const cal = comps.find((c) => c.name === 'VCALENDAR')!
    expect(cal.props.VERSION).toBe('2.0')
    const events = comps.filter((c) => c.name === 'VEVENT')
    expect(events).toHaveLength(6) // meeting + C1, C2, max, C3, C4
    for (const e of events) { expect(e.props.UID).toBeTruthy(); expect(e.props.DTSTAMP).toMatch(/Z$/); expect(e.props.DTSTART).toMatch(/^\d{8}T\d{6}Z$/) }
    const c2Event = events.find((e) => e.props.SUMMARY?.startsWith('C2'))!
    expect(c2Event.props.DTSTART).toBe(icsUtc(c2.utc))
    expect(events.find((e) => e.props.SUMMARY?.startsWith('Meet'))!.props.DTSTART).toBe('20270802T033000Z')
  })

  it('booking held, confirmed and receipt mails are written with the event', async () => {
    const trav = await signIn(TRAVELLER)
    const hold = await api('/api/trips/1/bookings', { method: 'POST', body: { seats: 1 }, cookie: trav })
    const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie: trav })
    await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${c.body.url.split('/pay/')[1]}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome: 'succeeded' }) })
    const to = (m: ParsedMail) => (m.to && 'value' in m.to ? m.to.value[0]!.address : '')
    expect(await waitFor(() => ['Seats held', 'Booking confirmed', 'Receipt'].every((s) => inbox.some((m) => to(m) === 'traveller@umbrafield.test' && m.subject?.startsWith(s))))).toBe(true)
    const held = inbox.find((m) => m.subject?.startsWith('Seats held'))!
    expect(held.text).toContain(`/bookings/${hold.body.id}`)
  })

  it('with SMTP down nothing is lost: every message arrives exactly once when it is back', async () => {
    const org = await signIn(ORGANISER)
    // Mail of earlier tests (an organiser's payment alert queued by a late webhook) goes out first, so only this test's mail is counted.
    await until(() => api('/api/outbox', { cookie: org }), (o) => o.body.data.every((m: { status: string }) => m.status === 'sent'))
    await stopSmtp()
    const before = inbox.length
    const r = await api('/api/trips/1/itinerary', { method: 'POST', body: { confirm: true }, cookie: org })
    const trav = await signIn(TRAVELLER)
    const hold = await api('/api/trips/1/bookings', { method: 'POST', body: { seats: 1 }, cookie: trav })
    expect(hold.status).toBe(201)
    // The hold queues the traveller's mail and an alert to each organiser (one in the demo, mailed at once by default).
    const fromHold = 2
    await new Promise((res) => setTimeout(res, 1200)) // several failed attempts
    const out = await api('/api/outbox', { cookie: org })
    const waiting = out.body.data.filter((m: { status: string; attempts: number }) => m.status === 'queued' && m.attempts > 0)
    expect(waiting.length).toBeGreaterThanOrEqual(r.body.queued + fromHold)
    expect(waiting[0].lastError).toBeTruthy()
    await startSmtp()
    expect(await waitFor(() => inbox.length - before >= r.body.queued + fromHold, 20_000)).toBe(true)
    await new Promise((res) => setTimeout(res, 1000))
    const arrived = inbox.slice(before)
    const ids = arrived.map((m) => m.messageId)
    expect(new Set(ids).size).toBe(ids.length) // no duplicates
    expect(arrived).toHaveLength(r.body.queued + fromHold)
    const after = await api('/api/outbox', { cookie: org })
    expect(after.body.data.filter((m: { status: string }) => m.status !== 'sent')).toEqual([])
  })

  it('the outbox is for organisers, and a failed message can be retried', async () => {
    expect((await api('/api/outbox', { cookie: await signIn(TRAVELLER) })).status).toBe(403)
    const org = await signIn(ORGANISER)
    const list = await api('/api/outbox', { cookie: org })
    expect(list.body.data.length).toBeGreaterThan(0)
    expect((await api(`/api/outbox/${list.body.data[0].id}/retry`, { method: 'POST', cookie: org })).status).toBe(409) // only failed ones
  })
})

describe('confirmed e-mail addresses', () => {
  it('a new account cannot hold seats until its owner follows the link in the confirmation e-mail', async () => {
    const email = `new-traveller-${Date.now()}@umbrafield.test`
    const reg = await api('/api/auth/register', { method: 'POST', body: { name: 'New Traveller', email, password: 'a-long-password-1' } })
    expect(reg.status).toBe(202)
    const cookie = await signIn(email, 'a-long-password-1')
    expect((await api('/api/me', { cookie })).body.emailConfirmed).toBe(false)
    const trips = await api('/api/trips')
    const luxor = trips.body.data.find((t: { title: string }) => t.title.startsWith('Luxor'))
    const refused = await api(`/api/trips/${luxor.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })
    expect(refused.status).toBe(403)
    expect(refused.body.data.code).toBe('email_unconfirmed')
    expect(await waitFor(() => inbox.some((m) => m.subject === 'Confirm your e-mail address' && m.text?.includes(email) === false && (m.to && 'value' in m.to ? m.to.value[0]!.address === email : false)))).toBe(true)
    const mail = inbox.find((m) => m.to && 'value' in m.to && m.to.value[0]!.address === email)!
    const link = mail.text!.match(/(http\S+\/verify-email\?token=([\w-]+))/)!
    expect(link[1]!.startsWith(`http://127.0.0.1:`)).toBe(true)
    const bad = await api('/api/auth/verify-email', { method: 'POST', body: { token: 'x'.repeat(20) } })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fields.token).toMatch(/not valid/)
    expect((await api('/api/auth/verify-email', { method: 'POST', body: { token: link[2] } })).status).toBe(200)
    // Once only
    expect((await api('/api/auth/verify-email', { method: 'POST', body: { token: link[2] } })).status).toBe(400)
    expect((await api('/api/me', { cookie })).body.emailConfirmed).toBe(true)
    expect((await api(`/api/trips/${luxor.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie })).status).toBe(201)
  })
})

describe('booking e-mails follow the kind of eclipse; sign-up tells an address owner', () => {
  it('the hold e-mail of the annular demo trip keeps filters on and never says totality', async () => {
    const trav = await signIn(TRAVELLER)
    const trips = await api('/api/trips')
    const annular = trips.body.data.find((t: { title: string }) => /Punta del Este/.test(t.title))
    expect((await api(`/api/trips/${annular.id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: trav })).status).toBe(201)
    expect(await waitFor(() => inbox.some((m) => m.subject === `Seats held: ${annular.title}`))).toBe(true)
    const mail = inbox.find((m) => m.subject === `Seats held: ${annular.title}`)!
    expect(mail.text).toContain('keep viewers and filters on throughout')
    expect(mail.text).not.toMatch(/totality/i)
    expect(String(mail.html)).not.toMatch(/totality/i)
  })

  it('signing up with an address that has an account answers as usual and e-mails its owner', async () => {
    const r = await api('/api/auth/register', { method: 'POST', body: { name: 'Not Samir', email: 'traveller2@umbrafield.test', password: 'someone-elses-pass' } })
    expect(r.status).toBe(202)
    expect(await waitFor(() => inbox.some((m) => m.subject === 'Someone tried to sign up with your address' && m.to && 'value' in m.to && m.to.value[0]!.address === 'traveller2@umbrafield.test'))).toBe(true)
  })
})
