import ExcelJS from 'exceljs'
import Papa from 'papaparse'
import { url } from '@nuxt/test-utils/e2e'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { advanceClock, api, GUIDE, ORGANISER, signIn, STRIPE_FAKE, TEST_DB, TRAVELLER, TRAVELLER2, until, useApp } from './app'

// The expedition manifest: one participant per booked seat, on SQLite and on PostgreSQL.
const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

const TRIP_START = '2027-07-31'
const TRIP_END = '2027-08-03'

const fx = { org: '', guide: '', trav: '', trav2: '', tripA: 0, tripB: 0, booking: 0, bookingComplete: 0, bookingB: 0, guideId: 0 }

async function makeTrip(title: string, startDate: string, endDate: string) {
  const t = await api('/api/trips', { method: 'POST', cookie: fx.org, body: {
    workspaceId: 1, primarySiteId: 4, title, startDate, endDate, seats: 10, priceMinor: 100_000, depositMinor: 20_000,
    currency: 'eur', balanceDueDate: '2027-05-01', guideIds: [fx.guideId],
    meetingPoint: { name: 'Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T03:30:00Z' },
  } })
  expect(t.status, JSON.stringify(t.body)).toBe(201)
  expect((await api(`/api/trips/${t.body.id}/publish`, { method: 'POST', cookie: fx.org })).status).toBe(200)
  return t.body.id as number
}

/** Holds `seats` and pays the deposit at the Stripe fake, as a traveller would; returns the confirmed booking's id. */
async function confirmedBooking(tripId: number, cookie: string, seats: number) {
  const hold = await api(`/api/trips/${tripId}/bookings`, { method: 'POST', body: { seats }, cookie })
  expect(hold.status, JSON.stringify(hold.body)).toBe(201)
  const c = await api(`/api/bookings/${hold.body.id}/checkout`, { method: 'POST', cookie })
  await fetch(`${STRIPE_FAKE}/_fake/checkout/sessions/${c.body.url.split('/pay/')[1]}/complete`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ outcome: 'succeeded' }) })
  const done = await until(() => api(`/api/bookings/${hold.body.id}`, { cookie }), (r) => r.body.status === 'confirmed')
  expect(done.body.status).toBe('confirmed')
  return hold.body.id as number
}

const complete = (over: Record<string, unknown> = {}) => ({
  fullName: 'Maren Test-Lindqvist', dateOfBirth: '1980-08-03', nationality: 'se', passportNumber: 'ab1234567', passportExpiry: '2030-01-31',
  mobilePhone: '+61 491 570 156', dietary: 'no nuts', medical: 'type 1 diabetes, insulin in the day bag', mobility: 'walks with a stick',
  emergencyContact: { name: 'Per Lindqvist', phone: '+61 2 5550 0123', relation: 'partner' }, room: { type: 'twin', with: 'Ola' }, ...over,
})
const put = (booking: number, seat: number, body: unknown, cookie = fx.trav) => api(`/api/bookings/${booking}/participants/${seat}`, { method: 'PUT', body, cookie })

beforeAll(async () => {
  fx.org = await signIn(ORGANISER)
  fx.guide = await signIn(GUIDE)
  fx.trav = await signIn(TRAVELLER)
  fx.trav2 = await signIn(TRAVELLER2)
  fx.guideId = (await db.selectFrom('users').select('id').where('email', '=', GUIDE).executeTakeFirstOrThrow()).id
  fx.tripA = await makeTrip('Manifest trip A (test)', TRIP_START, TRIP_END)
  fx.tripB = await makeTrip('Manifest trip B (test)', '2027-08-10', '2027-08-14')
  fx.booking = await confirmedBooking(fx.tripA, fx.trav, 2)
  fx.bookingComplete = await confirmedBooking(fx.tripA, fx.trav2, 1)
  fx.bookingB = await confirmedBooking(fx.tripB, fx.trav, 1)
}, 120_000)

describe(`participants (${TEST_DB})`, () => {
  it('each booked seat is one participant, holder first, and says what is missing', async () => {
    const r = await api(`/api/bookings/${fx.booking}/participants`, { cookie: fx.trav })
    expect(r.status).toBe(200)
    expect(r.body.data.map((p: { seat: number }) => p.seat)).toEqual([1, 2])
    expect(r.body.data[0].complete).toBe(false)
    expect(r.body.data[0].missing).toContain('passportNumber')
    expect(r.body.data[0].passportNumber).toBeNull()
    expect(r.body.meta).toMatchObject({ seats: 2, complete: 0, writable: true, trip: { endDate: TRIP_END, passportValidUntil: '2028-02-03' } })
  })

  it('answers 400 per field: unknown country, invalid phone', async () => {
    const r = await put(fx.booking, 1, complete({ nationality: 'XQ', mobilePhone: '+1 555 01', emergencyContact: { name: 'A', phone: '0123', relation: 'friend' } }))
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields).sort()).toEqual(['emergencyContact.phone', 'mobilePhone', 'nationality'])
    expect(r.body.data.fields.nationality).toMatch(/country code/i)
    expect(r.body.data.fields.mobilePhone).toMatch(/phone number/i)
    expect(r.body.data.fields['emergencyContact.phone']).toMatch(/international form/i)
    // Nothing was written.
    expect(await db.selectFrom('participants').select('id').where('booking_id', '=', fx.booking).execute()).toEqual([])
  })

  it('refuses a passport that expires less than six months after the trip ends, and says local rules decide', async () => {
    // Trip ends 2027-08-03: the passport must be valid until 2028-02-03.
    const short = await put(fx.booking, 1, complete({ passportExpiry: '2028-02-02' }))
    expect(short.status).toBe(400)
    expect(Object.keys(short.body.data.fields)).toEqual(['passportExpiry'])
    expect(short.body.data.fields.passportExpiry).toMatch(/less than 6 months after the trip ends/)
    expect(short.body.data.fields.passportExpiry).toMatch(/destination's own rules decide/)
    expect((await put(fx.booking, 1, complete({ passportExpiry: '2028-02-03' }))).status).toBe(200)
  })

  it('refuses dates that are not dates and a date of birth in the future', async () => {
    const r = await put(fx.booking, 2, { dateOfBirth: '2027-02-30', passportExpiry: 'soon', room: { type: 'suite' } })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fields).sort()).toEqual(['dateOfBirth', 'passportExpiry', 'room.type'])
    const future = await put(fx.booking, 2, { dateOfBirth: '2099-01-01' })
    expect(future.status).toBe(400)
    expect(future.body.data.fields).toEqual({ dateOfBirth: expect.stringMatching(/future/) })
  })

  it('only the booking\'s traveller and organisers may write; seats beyond the booking are 404', async () => {
    expect((await put(fx.booking, 2, { fullName: 'Anon' }, '')).status).toBe(401)
    expect((await put(fx.booking, 2, { fullName: 'Someone else' }, fx.trav2)).status).toBe(404)
    expect((await put(fx.booking, 2, { fullName: 'The guide' }, fx.guide)).status).toBe(404)
    expect((await api(`/api/bookings/${fx.booking}/participants`, { cookie: fx.trav2 })).status).toBe(404)
    expect((await api(`/api/bookings/${fx.booking}/participants`, { cookie: fx.guide })).status).toBe(404)
    expect((await put(fx.booking, 3, { fullName: 'Seat three' })).status).toBe(404)
    expect((await put(fx.booking, 0, { fullName: 'Seat zero' })).status).toBe(400)
    // The organiser may fill in a seat for the traveller.
    const byOrg = await put(fx.booking, 2, { fullName: 'Ola Test', nationality: 'NO', mobilePhone: '+61491570157' }, fx.org)
    expect(byOrg.status).toBe(200)
    expect(byOrg.body).toMatchObject({ seat: 2, fullName: 'Ola Test', nationality: 'NO', mobilePhone: '+61491570157', complete: false })
    const row = await db.selectFrom('participants').select(['full_name', 'updated_by']).where('booking_id', '=', fx.booking).where('seat', '=', 2).executeTakeFirstOrThrow()
    expect(row.full_name).toBe('Ola Test')
    expect((await put(fx.bookingComplete, 1, complete({ fullName: 'Kai Complete' }), fx.trav2)).status).toBe(200)
  })

  it('stores a complete seat normalised, and reads it back complete', async () => {
    const r = await api(`/api/bookings/${fx.booking}/participants`, { cookie: fx.trav })
    expect(r.body.data[0]).toMatchObject({
      seat: 1, complete: true, missing: [], nationality: 'SE', passportNumber: 'AB1234567', mobilePhone: '+61491570156',
      emergencyContact: { name: 'Per Lindqvist', phone: '+61255500123', relation: 'partner' }, room: { type: 'twin', with: 'Ola' },
    })
    expect(r.body.data[1].complete).toBe(false)
    expect(r.body.meta.complete).toBe(1)
  })

  it('never keeps passport numbers, dates of birth, phones or notes in plain text (read from the database)', async () => {
    const row = await db.selectFrom('participants').selectAll().where('booking_id', '=', fx.booking).where('seat', '=', 1).executeTakeFirstOrThrow()
    const text = JSON.stringify(row)
    for (const plain of ['AB1234567', '1980-08-03', '61491570156', '61255500123', 'no nuts', 'diabetes', 'walks with a stick']) expect(text).not.toContain(plain)
    for (const col of ['date_of_birth_sealed', 'passport_number_sealed', 'mobile_phone_sealed', 'dietary_sealed', 'medical_sealed', 'mobility_sealed', 'emergency_phone_sealed'] as const) {
      expect(row[col], col).toMatch(/^uf1\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/)
    }
    // A sealed value moved to another seat does not open there (its context names the booking and seat).
    await db.updateTable('participants').set({ medical_sealed: row.medical_sealed }).where('booking_id', '=', fx.booking).where('seat', '=', 2).execute()
    const r = await api(`/api/bookings/${fx.booking}/participants`, { cookie: fx.trav })
    expect(r.status).toBe(200)
    expect(r.body.data[1].medical).toBeNull()
    await db.updateTable('participants').set({ medical_sealed: null }).where('booking_id', '=', fx.booking).where('seat', '=', 2).execute()
  })
})

describe(`the manifest (${TEST_DB})`, () => {
  const logRows = () => db.selectFrom('participant_access_log').selectAll().where('trip_id', '=', fx.tripA).orderBy('id').execute()

  it('organisers see every field of every confirmed seat, and the read is logged', async () => {
    const before = (await logRows()).length
    const r = await api(`/api/trips/${fx.tripA}/manifest`, { cookie: fx.org })
    expect(r.status).toBe(200)
    expect(r.body.meta).toEqual({ complete: 2, total: 3 })
    const maren = r.body.data.find((p: { bookingId: number; seat: number }) => p.bookingId === fx.booking && p.seat === 1)
    expect(maren).toMatchObject({ passportNumber: 'AB1234567', dateOfBirth: '1980-08-03', passportExpiry: '2028-02-03', medical: 'type 1 diabetes, insulin in the day bag' })
    // Born 1980-08-03: still 46 on the eclipse day, 2027-08-02.
    expect(maren.ageOnTheDay).toBe(46)
    const log = await logRows()
    expect(log.length).toBe(before + 1)
    const orgId = (await db.selectFrom('users').select('id').where('email', '=', ORGANISER).executeTakeFirstOrThrow()).id
    expect(log.at(-1)).toMatchObject({ user_id: orgId, fields: 'passportNumber,medical', via: 'manifest', trip_id: fx.tripA })
  })

  it('the trip\'s guides see names, age, notes, phones and emergency contacts, and no passport or date-of-birth keys at all', async () => {
    const before = (await logRows()).length
    const r = await api(`/api/trips/${fx.tripA}/manifest`, { cookie: fx.guide })
    expect(r.status).toBe(200)
    expect(r.body.data).toHaveLength(3)
    for (const p of r.body.data) {
      for (const k of ['passportNumber', 'dateOfBirth', 'passportExpiry', 'nationality']) expect(Object.keys(p), k).not.toContain(k)
      expect(Object.keys(p)).toEqual(expect.arrayContaining(['fullName', 'ageOnTheDay', 'dietary', 'medical', 'mobility', 'mobilePhone', 'emergencyContact']))
    }
    const raw = JSON.stringify(r.body)
    expect(raw).not.toContain('AB1234567')
    expect(raw).not.toContain('1980-08-03')
    const maren = r.body.data.find((p: { bookingId: number; seat: number }) => p.bookingId === fx.booking && p.seat === 1)
    expect(maren).toMatchObject({ fullName: 'Maren Test-Lindqvist', ageOnTheDay: 46, medical: 'type 1 diabetes, insulin in the day bag', emergencyContact: { phone: '+61255500123' } })
    const log = await logRows()
    expect(log.length).toBe(before + 1)
    expect(log.at(-1)).toMatchObject({ user_id: fx.guideId, fields: 'medical', via: 'manifest' })
  })

  it('travellers get 403, even those booked on the trip; signed out 401', async () => {
    expect((await api(`/api/trips/${fx.tripA}/manifest`, { cookie: fx.trav })).status).toBe(403)
    expect((await api(`/api/trips/${fx.tripA}/manifest`)).status).toBe(401)
    expect((await api(`/api/trips/${fx.tripA}/manifest.csv`, { cookie: fx.guide })).status).toBe(403)
    expect((await api(`/api/trips/${fx.tripA}/manifest.xlsx`, { cookie: fx.trav })).status).toBe(403)
    expect((await api(`/api/trips/${fx.tripA}/manifest/access-log`, { cookie: fx.guide })).status).toBe(403)
  })

  it('CSV and XLSX exports keep formula-like text as text, and are logged', async () => {
    const evil = '=HYPERLINK("http://attacker.test","open")'
    expect((await put(fx.booking, 2, { fullName: evil, dietary: 'fine\n@SUM(1+1)', emergencyContact: { name: '+cmd', relation: '-x' } })).status).toBe(200)
    const before = (await logRows()).length
    const csv = await api(`/api/trips/${fx.tripA}/manifest.csv`, { cookie: fx.org })
    expect(csv.status).toBe(200)
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/)
    const parsed = Papa.parse<Record<string, string>>(csv.body as string, { header: true, skipEmptyLines: true }).data
    const ola = parsed.find((r) => r.booking_id === String(fx.booking) && r.seat === '2')!
    expect(ola.full_name).toBe(`'${evil}`)
    expect(ola.dietary).toBe('fine\n\'@SUM(1+1)')
    expect(ola.emergency_name).toBe('\'+cmd')
    expect(ola.emergency_relation).toBe('\'-x')
    const maren = parsed.find((r) => r.booking_id === String(fx.booking) && r.seat === '1')!
    expect(maren.passport_number).toBe('AB1234567')

    const res = await fetch(url(`/api/trips/${fx.tripA}/manifest.xlsx`), { headers: { cookie: fx.org } })
    expect(res.status).toBe(200)
    const wb = new ExcelJS.Workbook()
    await wb.xlsx.load(Buffer.from(await res.arrayBuffer()) as never)
    const ws = wb.getWorksheet('Manifest')!
    const header = (ws.getRow(1).values as unknown[]).slice(1)
    const col = (name: string) => header.indexOf(name) + 1
    let found = 0
    ws.eachRow((row, n) => {
      if (n === 1) return
      row.eachCell((cell) => {
        // No cell is a formula, whatever it holds.
        expect(cell.type).not.toBe(ExcelJS.ValueType.Formula)
        expect(cell.formula).toBeUndefined()
      })
      if (row.getCell(col('booking_id')).value === fx.booking && row.getCell(col('seat')).value === 2) {
        found++
        expect(row.getCell(col('full_name')).type).toBe(ExcelJS.ValueType.String)
        expect(row.getCell(col('full_name')).value).toBe(`'${evil}`)
        expect(row.getCell(col('emergency_name')).value).toBe('\'+cmd')
      }
    })
    expect(found).toBe(1)
    const log = await logRows()
    expect(log.slice(before).map((l) => l.via)).toEqual(['manifest.csv', 'manifest.xlsx'])
  })

  it('organisers read the access log: who, when, what, through what', async () => {
    const r = await api(`/api/trips/${fx.tripA}/manifest/access-log`, { cookie: fx.org })
    expect(r.status).toBe(200)
    const vias = r.body.data.map((e: { via: string }) => e.via)
    expect(vias.slice(0, 2)).toEqual(['manifest.xlsx', 'manifest.csv'])
    expect(r.body.data.find((e: { via: string; user: { role: string } }) => e.via === 'manifest' && e.user.role === 'guide').fields).toEqual(['medical'])
    expect(r.body.meta.total).toBe(r.body.data.length)
    expect(r.body.data[0].at).toMatch(/^\d{4}-\d{2}-\d{2}T/)
  })

  it('the emergency sheet has names, notes and emergency phones, no passport data, and is logged', async () => {
    const before = (await logRows()).length
    const r = await api(`/api/trips/${fx.tripA}/emergency-sheet`, { cookie: fx.guide })
    expect(r.status).toBe(200)
    expect(JSON.stringify(r.body)).not.toContain('AB1234567')
    expect(r.body.data.find((p: { bookingId: number; seat: number }) => p.bookingId === fx.booking && p.seat === 1))
      .toMatchObject({ name: 'Maren Test-Lindqvist', medical: 'type 1 diabetes, insulin in the day bag', mobility: 'walks with a stick', emergencyContact: { phone: '+61255500123' } })
    expect((await logRows()).slice(before).map((l) => [l.via, l.fields])).toEqual([['emergency-sheet', 'medical']])
    expect((await api(`/api/trips/${fx.tripA}/emergency-sheet`, { cookie: fx.trav })).status).toBe(403)
  })

  it('an organiser\'s reminder goes out once a day per booking; a complete booking has nothing to remind of', async () => {
    const one = await api(`/api/trips/${fx.tripA}/manifest/remind`, { method: 'POST', cookie: fx.org, body: { bookingId: fx.booking } })
    expect(one.status).toBe(202)
    expect(one.body.queued).toBe(true)
    const again = await api(`/api/trips/${fx.tripA}/manifest/remind`, { method: 'POST', cookie: fx.org, body: { bookingId: fx.booking } })
    expect(again.body.queued).toBe(false)
    const done = await api(`/api/trips/${fx.tripA}/manifest/remind`, { method: 'POST', cookie: fx.org, body: { bookingId: fx.bookingComplete } })
    expect(done.status).toBe(400)
    expect(done.body.data.fields.bookingId).toMatch(/complete/)
    expect((await api(`/api/trips/${fx.tripB}/manifest/remind`, { method: 'POST', cookie: fx.org, body: { bookingId: fx.booking } })).status).toBe(404)
    const mail = await db.selectFrom('outbox').select(['text', 'to_email']).where('kind', '=', 'participants-reminder').where('booking_id', '=', fx.booking).execute()
    expect(mail).toHaveLength(1)
    expect(mail[0]!.to_email).toBe(TRAVELLER)
    // The message names what is missing, never the details themselves.
    expect(mail[0]!.text).toMatch(/Seat 2: .*passport number/)
    expect(mail[0]!.text).not.toContain('AB1234567')
  })

  it('a cancelled booking keeps its participants readable, but they can no longer be changed (409)', async () => {
    const b = await confirmedBooking(fx.tripB, fx.trav2, 1)
    expect((await put(b, 1, { fullName: 'Before cancel' }, fx.trav2)).status).toBe(200)
    expect((await api(`/api/bookings/${b}/cancel`, { method: 'POST', cookie: fx.trav2 })).status).toBe(200)
    const r = await put(b, 1, { fullName: 'After cancel' }, fx.trav2)
    expect(r.status).toBe(409)
    expect(r.body.message).toMatch(/cancelled/)
    const read = await api(`/api/bookings/${b}/participants`, { cookie: fx.trav2 })
    expect(read.status).toBe(200)
    expect(read.body.data[0].fullName).toBe('Before cancel')
    expect(read.body.meta.writable).toBe(false)
    // And it leaves the manifest.
    const m = await api(`/api/trips/${fx.tripB}/manifest`, { cookie: fx.org })
    expect(m.body.data.map((p: { bookingId: number }) => p.bookingId)).not.toContain(b)
  })
})

describe(`reminders follow the business date (${TEST_DB}; moves the app's clock, so last)`, () => {
  const reminders = async (bookingId: number) => (await db.selectFrom('outbox').select('dedupe_key').where('kind', '=', 'participants-reminder')
    .where('booking_id', '=', bookingId).where('dedupe_key', 'not like', 'participants-manual-%').orderBy('id').execute()).map((m) => m.dedupe_key)
  const moveTo = async (iso: string) => {
    const now = Date.parse(await advanceClock(0))
    expect(now).toBeLessThan(Date.parse(iso))
    await advanceClock(Date.parse(iso) - now)
  }

  it('incomplete bookings are reminded 45 and 14 days before the trip, once each; complete ones never', async () => {
    // Months before the trip: nothing yet.
    expect(await reminders(fx.booking)).toEqual([])
    // Trip A starts 2027-07-31: 45 days before is 2027-06-16.
    await moveTo('2027-06-16T09:00:00Z')
    expect(await until(() => reminders(fx.booking), (m) => m.length > 0, 15_000)).toEqual([`participants-45-${fx.booking}`])
    // Trip B starts 2027-08-10 (45 days before: 2027-06-26). Its reminder shows that housekeeping ran
    // again after the move, and trip A's was not sent a second time.
    await moveTo('2027-06-26T09:00:00Z')
    expect(await until(() => reminders(fx.bookingB), (m) => m.length > 0, 15_000)).toEqual([`participants-45-${fx.bookingB}`])
    expect(await reminders(fx.booking)).toEqual([`participants-45-${fx.booking}`])
    // 14 days before trip A.
    await moveTo('2027-07-17T09:00:00Z')
    expect(await until(() => reminders(fx.booking), (m) => m.length > 1, 15_000)).toEqual([`participants-45-${fx.booking}`, `participants-14-${fx.booking}`])
    // 14 days before trip B: trip A's booking still has exactly one of each.
    await moveTo('2027-07-27T09:00:00Z')
    expect(await until(() => reminders(fx.bookingB), (m) => m.length > 1, 15_000)).toEqual([`participants-45-${fx.bookingB}`, `participants-14-${fx.bookingB}`])
    expect(await reminders(fx.booking)).toEqual([`participants-45-${fx.booking}`, `participants-14-${fx.booking}`])
    // The complete booking was never reminded.
    expect(await reminders(fx.bookingComplete)).toEqual([])
  }, 90_000)
})
