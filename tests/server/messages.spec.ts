import Papa from 'papaparse'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { api, caughtMail, ORGANISER, signIn, TEST_DB, TRAVELLER, useApp } from './app'
import { freshAccount, hold, payDue, publishedTrip } from './operationsHelpers'

const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

/** The outbox rows of kind `kind` about a trip, read from the database itself. */
const outboxOf = (tripId: number, kind: string) => db.selectFrom('outbox').select(['to_email', 'subject', 'html', 'text', 'booking_id']).where('trip_id', '=', tripId).where('kind', '=', kind).orderBy('id').execute()

describe(`messages to the group (${TEST_DB})`, () => {
  it('reach confirmed bookings or all active ones, are kept in the history, and each traveller sees those sent to their booking', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org)
    const [paid, holding, gone] = [await freshAccount(org, 'Msg Paid'), await freshAccount(org, 'Msg Holding'), await freshAccount(org, 'Msg Gone')]
    const paidBooking = await hold(tripId, paid.cookie)
    await payDue(paidBooking, paid.cookie)
    const heldBooking = await hold(tripId, holding.cookie)
    const goneBooking = await hold(tripId, gone.cookie)
    expect((await api(`/api/bookings/${goneBooking}/cancel`, { method: 'POST', body: {}, cookie: gone.cookie })).status).toBe(200)

    const toConfirmed = await api(`/api/trips/${tripId}/messages`, { method: 'POST', cookie: org, body: { subject: 'Bus times', body: 'The bus leaves at 05:30.', to: 'confirmed' } })
    expect(toConfirmed.status).toBe(202)
    expect(toConfirmed.body.queued).toBe(1)
    expect((await outboxOf(tripId, 'trip-message')).map((m) => m.to_email)).toEqual([paid.email])

    const toAll = await api(`/api/trips/${tripId}/messages`, { method: 'POST', cookie: org, body: { subject: 'Packing', body: 'Bring a hat.\n\nAnd water.', to: 'all' } })
    expect(toAll.status).toBe(202)
    expect(toAll.body.queued).toBe(2)
    expect((await outboxOf(tripId, 'trip-message')).slice(1).map((m) => m.to_email).sort()).toEqual([paid.email, holding.email].sort())

    const history = await api(`/api/trips/${tripId}/messages`, { cookie: org })
    expect(history.status).toBe(200)
    expect(history.body.data.map((m: { subject: string; to: string; recipients: number }) => [m.subject, m.to, m.recipients])).toEqual([['Packing', 'all', 2], ['Bus times', 'confirmed', 1]])

    const seen = async (bookingId: number, cookie: string) => (await api(`/api/bookings/${bookingId}/messages`, { cookie })).body.data.map((m: { subject: string }) => m.subject)
    expect(await seen(paidBooking, paid.cookie)).toEqual(['Packing', 'Bus times'])
    expect(await seen(heldBooking, holding.cookie)).toEqual(['Packing'])
    expect(await seen(goneBooking, gone.cookie)).toEqual([])
    // Someone else's booking is a 404, not its messages.
    expect((await api(`/api/bookings/${paidBooking}/messages`, { cookie: holding.cookie })).status).toBe(404)
    // Travellers cannot write to the group nor read its history.
    const trav = await signIn(TRAVELLER)
    expect((await api(`/api/trips/${tripId}/messages`, { method: 'POST', cookie: trav, body: { subject: 'x', body: 'y', to: 'all' } })).status).toBe(403)
    expect((await api(`/api/trips/${tripId}/messages`, { cookie: trav })).status).toBe(403)
    // The mail reaches the traveller.
    const mail = await caughtMail(paid.email, /^Packing — /)
    expect(mail.text).toContain('Bring a hat.\n\nAnd water.')
  })

  it('an HTML-injection attempt in the body or subject is escaped in the HTML mail and its preview', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org)
    const t = await freshAccount(org, 'Msg Target')
    await hold(tripId, t.cookie)
    const body = 'Hi <script>alert("owned")</script>\n<img src=x onerror="alert(1)"> & <a href="https://evil.test">click</a>'
    const msg = { subject: 'Read <b>this</b>', body, to: 'all' as const }
    const preview = await api(`/api/trips/${tripId}/messages/preview`, { method: 'POST', cookie: org, body: msg })
    expect(preview.status).toBe(200)
    expect(preview.body.recipients).toBe(1)
    expect((await api(`/api/trips/${tripId}/messages`, { method: 'POST', cookie: org, body: msg })).status).toBe(202)
    const [row] = await outboxOf(tripId, 'trip-message')
    for (const html of [row!.html, preview.body.preview.html as string]) {
      expect(html).not.toMatch(/<script|<img|<a href="https:\/\/evil|<b>/i)
      expect(html).toContain('Hi &lt;script&gt;alert(&quot;owned&quot;)&lt;/script&gt;<br>&lt;img src=x onerror=&quot;alert(1)&quot;&gt; &amp; &lt;a href=&quot;https://evil.test&quot;&gt;click&lt;/a&gt;')
      expect(html).toContain('Read &lt;b&gt;this&lt;/b&gt;')
    }
    // The plain-text part carries what was typed, unchanged.
    expect(row!.text).toContain(body)
    const caught = await caughtMail(t.email, /^Read <b>this<\/b> — /)
    expect(caught.html).not.toMatch(/<script|<img/i)
  })

  it('refuses a bad audience, a subject that would break the mail header and hidden direction overrides, naming the field; nothing is queued', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org)
    const t = await freshAccount(org, 'Msg Bad')
    await hold(tripId, t.cookie)
    const cases: Array<[Record<string, unknown>, string]> = [
      [{ subject: 'Hi', body: 'x', to: 'everyone' }, 'to'],
      [{ subject: 'Hi\r\nBcc: victim@example.test', body: 'x', to: 'all' }, 'subject'],
      [{ subject: 'Hi', body: 'pay to \u202Etxt.exe', to: 'all' }, 'body'],
      [{ subject: 'Hi', body: '', to: 'all' }, 'body'],
    ]
    for (const [body, field] of cases) {
      const r = await api(`/api/trips/${tripId}/messages`, { method: 'POST', cookie: org, body })
      expect(r.status, JSON.stringify(body)).toBe(400)
      expect(Object.keys(r.body.data.fields)).toContain(field)
    }
    expect(await outboxOf(tripId, 'trip-message')).toEqual([])
    expect((await api(`/api/trips/${tripId}/messages`, { cookie: org })).body.data).toEqual([])
    expect((await api('/api/trips/999999/messages', { method: 'POST', cookie: org, body: { subject: 'Hi', body: 'x', to: 'all' } })).status).toBe(404)
  })
})

describe(`searching a trip's bookings (${TEST_DB})`, () => {
  it('filters by name or e-mail, status and balance owed, exactly; the CSV takes the same filters', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org)
    const full = await freshAccount(org, 'Quilla Fullpaid')
    const owes = await freshAccount(org, 'Rasmus Owesome')
    const holds = await freshAccount(org, 'Sigrun Holder')
    const quits = await freshAccount(org, 'Tomasz Quitter')
    const fullB = await hold(tripId, full.cookie)
    await payDue(fullB, full.cookie)
    await payDue(fullB, full.cookie) // the balance too: nothing owed
    const owesB = await hold(tripId, owes.cookie)
    await payDue(owesB, owes.cookie) // the deposit only: the balance is owed
    const holdsB = await hold(tripId, holds.cookie)
    const quitsB = await hold(tripId, quits.cookie)
    expect((await api(`/api/bookings/${quitsB}/cancel`, { method: 'POST', body: {}, cookie: quits.cookie })).status).toBe(200)

    const ids = async (query: string) => {
      const r = await api(`/api/trips/${tripId}/bookings?${query}`, { cookie: org })
      expect(r.status, query).toBe(200)
      return (r.body.data as Array<{ id: number }>).map((b) => b.id).sort((a, b) => a - b)
    }
    expect(await ids('')).toEqual([fullB, owesB, holdsB, quitsB])
    expect(await ids('q=owesome')).toEqual([owesB]) // part of a name, any case
    expect(await ids('q=RASMUS')).toEqual([owesB])
    expect(await ids(`q=${encodeURIComponent(holds.email.slice(0, 10))}`)).toEqual([holdsB]) // part of an e-mail
    expect(await ids('q=%25')).toEqual([]) // a percent sign is text, not a wildcard
    expect(await ids('q=_')).toEqual([])
    expect(await ids('status=held')).toEqual([holdsB])
    expect(await ids('status=cancelled')).toEqual([quitsB])
    expect(await ids('status=confirmed')).toEqual([fullB, owesB])
    expect(await ids('owing=true')).toEqual([owesB])
    expect(await ids('owing=false')).toEqual([fullB, holdsB, quitsB])
    expect(await ids('status=confirmed&owing=false')).toEqual([fullB])
    expect(await ids('q=quitter&status=held')).toEqual([])
    const meta = (await api(`/api/trips/${tripId}/bookings?status=held`, { cookie: org })).body.meta
    expect(meta).toMatchObject({ total: 4, matched: 1 })
    const bad = await api(`/api/trips/${tripId}/bookings?status=paid&owing=maybe`, { cookie: org })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fields).sort()).toEqual(['owing', 'status'])

    const csv = await api(`/api/trips/${tripId}/bookings.csv?owing=true`, { cookie: org })
    expect(csv.status).toBe(200)
    const rows = Papa.parse<Record<string, string>>(csv.body as string, { header: true, skipEmptyLines: true }).data
    expect(rows.map((r) => Number(r.booking_id))).toEqual([owesB])
    const none = await api(`/api/trips/${tripId}/bookings.csv?q=nobody-matches-this`, { cookie: org })
    expect((none.body as string).trim()).toBe('booking_id,name,email,seats,status,currency,price,paid,refunded,due_now,balance,created_at')
  })
})

describe(`the bookings CSV for accounts (${TEST_DB})`, () => {
  const csvOf = async (org: string, tripId: number) => {
    const r = await api(`/api/trips/${tripId}/bookings.csv`, { cookie: org })
    expect(r.status).toBe(200)
    expect(r.headers.get('content-type')).toMatch(/^text\/csv/)
    return Papa.parse<Record<string, string>>(r.body as string, { header: true, skipEmptyLines: true }).data
  }

  it('gives EUR amounts in euros with two decimals and a currency column', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org, { priceMinor: 123_456, depositMinor: 20_005, currency: 'eur' })
    const t = await freshAccount(org, 'Csv Euro')
    const b = await hold(tripId, t.cookie, 2)
    await payDue(b, t.cookie)
    const [row] = await csvOf(org, tripId)
    // 2 seats: price 2 × 1234.56, deposit paid 2 × 200.05, balance the rest.
    expect(row).toMatchObject({ booking_id: String(b), currency: 'EUR', status: 'confirmed', price: '2469.12', paid: '400.10', refunded: '0.00', due_now: '2069.02', balance: '2069.02' })
    expect(Object.keys(row!).some((k) => k.endsWith('_minor'))).toBe(false)
  })

  it('gives JPY (no minor unit) in whole yen and KWD (three decimals) in dinars with three decimals', async () => {
    const org = await signIn(ORGANISER)
    const yen = await publishedTrip(org, { priceMinor: 120_000, depositMinor: 30_000, currency: 'jpy' })
    const dinar = await publishedTrip(org, { priceMinor: 1_250, depositMinor: 5, currency: 'kwd' })
    const t = await freshAccount(org, 'Csv Yen')
    await hold(yen, t.cookie)
    await hold(dinar, t.cookie, 3)
    const [y] = await csvOf(org, yen)
    expect(y).toMatchObject({ currency: 'JPY', status: 'held', price: '120000', paid: '0', due_now: '30000', balance: '0' })
    const [k] = await csvOf(org, dinar)
    expect(k).toMatchObject({ currency: 'KWD', price: '3.750', paid: '0.000', due_now: '0.015' })
  })

  it('keeps a formula-like traveller name as text', async () => {
    const org = await signIn(ORGANISER)
    const tripId = await publishedTrip(org)
    const t = await freshAccount(org, '=HYPERLINK("https://evil.test","x")')
    await hold(tripId, t.cookie)
    const [row] = await csvOf(org, tripId)
    expect(row!.name).toBe('\'=HYPERLINK("https://evil.test","x")')
  })
})
